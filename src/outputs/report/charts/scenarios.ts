/**
 * Forecast scenarios side by side: one panel per scenario on shared axes, each showing the
 * last weeks of the fit (grey) and the scenario's forecast (its own colour) as interval bands
 * around the median, the observed counts as dots and the last observed day as a vertical
 * line. Panels share their y scale so that scenarios compare at a glance.
 */
import type { ChartSpec } from '../render.js';
import type { FanPoint } from './fan.js';
import { dateX } from './fan.js';
import { BAND_OPACITY, CHART_CONFIG, COLOURS, SCENARIO_COLOURS, SIZE } from '../theme.js';

export interface ScenarioPanels {
  scenarios: readonly string[];
  /** forecast bands per scenario (same order as `scenarios`) */
  forecast: ReadonlyArray<readonly FanPoint[]>;
  /** fitted past shown in every panel */
  past: readonly FanPoint[];
  observed: ReadonlyArray<{ date: string; value: number }>;
  lastObserved: string;
  yTitle: string;
  reference?: number;
}

/** Label of the fitted past in the colour scale (cannot clash: scenario names are prefixed). */
const PAST = 'fit to date';

export function scenarioPanelsSpec(o: ScenarioPanels): ChartSpec {
  const key = (s: string) => `scenario: ${s}`;
  const rows: Array<Record<string, unknown>> = [];
  o.scenarios.forEach((s, i) => {
    for (const p of o.past) rows.push({ ...p, scenario: s, series: PAST, kind: 'band' });
    for (const p of o.forecast[i]) rows.push({ ...p, scenario: s, series: key(s), kind: 'band' });
    for (const p of o.observed) if (Number.isFinite(p.value)) rows.push({ date: p.date, value: p.value, scenario: s, kind: 'obs' });
    rows.push({ date: o.lastObserved, scenario: s, kind: 'now' });
    if (o.reference !== undefined) rows.push({ ref: o.reference, scenario: s, kind: 'ref' });
  });
  const colour = {
    field: 'series',
    type: 'nominal',
    scale: { domain: [PAST, ...o.scenarios.map(key)], range: [COLOURS.context, ...o.scenarios.map((_, i) => SCENARIO_COLOURS[i % SCENARIO_COLOURS.length])] },
    legend: null,
  };
  const y = (field: string) => ({ field, type: 'quantitative', title: o.yTitle, axis: { titleLimit: SIZE.half.height }, scale: { zero: false, nice: true } });
  const band = { filter: "datum.kind === 'band'" };
  const columns = Math.min(o.scenarios.length, 3);
  const width = Math.floor((SIZE.wide.width - 40 * (columns - 1)) / columns);
  return {
    description: `forecast of ${o.yTitle} under each scenario`,
    config: { ...CHART_CONFIG, facet: { spacing: 26 } },
    data: { values: rows },
    facet: { field: 'scenario', type: 'nominal', title: null, sort: o.scenarios as string[], header: { labelFontSize: 12, labelFontWeight: 600, labelAnchor: 'start', labelLimit: width } },
    columns,
    spec: {
      width,
      height: SIZE.half.height,
      layer: [
        { transform: [band], mark: { type: 'area', opacity: BAND_OPACITY.outer }, encoding: { x: dateX(), y: y('outerLo'), y2: { field: 'outerHi' }, color: colour, detail: { field: 'series' } } },
        { transform: [band], mark: { type: 'area', opacity: BAND_OPACITY.inner }, encoding: { x: dateX(), y: y('innerLo'), y2: { field: 'innerHi' }, color: colour, detail: { field: 'series' } } },
        { transform: [band], mark: { type: 'line', strokeWidth: 1.8 }, encoding: { x: dateX(), y: y('mid'), color: colour, detail: { field: 'series' } } },
        ...(o.observed.some((p) => Number.isFinite(p.value))
          ? [{ transform: [{ filter: "datum.kind === 'obs'" }], mark: { type: 'circle', size: 12, color: COLOURS.observed, opacity: 0.85, aria: false }, encoding: { x: dateX(), y: y('value') } }]
          : []),
        { transform: [{ filter: "datum.kind === 'now'" }], mark: { type: 'rule', color: '#555555', strokeDash: [2, 2] }, encoding: { x: dateX() } },
        ...(o.reference === undefined
          ? []
          : [{ transform: [{ filter: "datum.kind === 'ref'" }], mark: { type: 'rule', color: COLOURS.reference, strokeDash: [5, 3] }, encoding: { y: { field: 'ref', type: 'quantitative' } } }]),
      ],
    },
  } as unknown as ChartSpec;
}
