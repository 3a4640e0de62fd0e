/**
 * The report's look in one place: colours, type and the chart configuration shared by every
 * chart. Colours are the Okabe-Ito palette (Okabe and Ito 2008, "Color Universal Design"),
 * chosen to stay distinct for the common forms of colour-vision deficiency; meaning is never
 * carried by colour alone (keys and captions name every series).
 */
import type { Config } from 'vega-lite';

export const OKABE_ITO = {
  black: '#000000',
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const;

/** Roles of the colours in every chart of the report. */
export const COLOURS = {
  /** posterior estimates: median line and interval bands */
  estimate: OKABE_ITO.blue,
  /** posterior predictive (what new reports would look like) */
  predictive: OKABE_ITO.skyBlue,
  /** observed data */
  observed: '#1f1f1f',
  /** priors */
  prior: OKABE_ITO.orange,
  /** reference lines (R = 1, zero growth, thresholds) */
  reference: OKABE_ITO.vermillion,
  /** the nowcast window */
  nowcast: OKABE_ITO.yellow,
  /** context (fitted past shown beside a forecast) */
  context: '#7a7a7a',
} as const;

/** Chain colours for trace and rank plots (Okabe-Ito minus yellow, too pale for lines). */
export const CHAIN_COLOURS = [
  OKABE_ITO.blue,
  OKABE_ITO.vermillion,
  OKABE_ITO.bluishGreen,
  OKABE_ITO.reddishPurple,
  OKABE_ITO.orange,
  OKABE_ITO.skyBlue,
  OKABE_ITO.black,
] as const;

/** Scenario colours for forecasts. */
export const SCENARIO_COLOURS = [
  OKABE_ITO.blue,
  OKABE_ITO.vermillion,
  OKABE_ITO.bluishGreen,
  OKABE_ITO.reddishPurple,
  OKABE_ITO.orange,
  OKABE_ITO.skyBlue,
] as const;

/** Opacity of the outer and inner interval bands of a fan chart. */
export const BAND_OPACITY = { outer: 0.18, inner: 0.36 } as const;

/** System fonts only: the page loads nothing from outside. */
export const FONT_STACK = '"Source Sans 3", "Segoe UI", "Helvetica Neue", Arial, "Liberation Sans", sans-serif';
export const MONO_STACK = '"DejaVu Sans Mono", "Cascadia Mono", Menlo, Consolas, monospace';

export const INK = '#20262e';
export const MUTED = '#5b6470';
export const GRID = '#e4e1da';

/** Standard chart sizes (pixels of the plotting area). */
export const SIZE = {
  wide: { width: 820, height: 250 },
  half: { width: 370, height: 210 },
  small: { width: 250, height: 150 },
} as const;

/** vega-lite configuration shared by every chart. */
export const CHART_CONFIG: Config = {
  background: 'transparent',
  // the page's style sheet sets the font of chart text; this generic name keeps each SVG small
  font: 'sans-serif',
  padding: { left: 4, right: 12, top: 6, bottom: 4 },
  view: { stroke: null },
  axis: {
    labelColor: MUTED,
    titleColor: INK,
    labelFontSize: 11,
    titleFontSize: 12,
    titleFontWeight: 600,
    gridColor: GRID,
    domainColor: '#9a958c',
    tickColor: '#9a958c',
  },
  axisX: { grid: false },
  axisY: { gridDash: [2, 3] },
  header: { labelFontSize: 12, labelFontWeight: 600, labelColor: INK, titleFontSize: 12 },
  title: { fontSize: 13, fontWeight: 600, color: INK, anchor: 'start' },
  legend: { labelFontSize: 11, titleFontSize: 11, labelColor: INK },
};
