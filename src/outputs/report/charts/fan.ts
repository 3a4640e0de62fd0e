/**
 * Fan chart specification: a quantity over calendar days as nested credible-interval bands
 * around the posterior median, with optional observed points, a horizontal reference line
 * (R = 1, zero growth) and a shaded window (the nowcast window). Declarative vega-lite; the
 * chart library draws it.
 */
import type { ChartSpec } from '../render.js';
import { BAND_OPACITY, CHART_CONFIG, COLOURS, SIZE } from '../theme.js';

/** One day of a band series: median and the outer and (optional) inner interval. */
export interface FanPoint {
  date: string;
  mid: number;
  outerLo: number;
  outerHi: number;
  innerLo: number | null;
  innerHi: number | null;
}

export interface FanSeries {
  points: readonly FanPoint[];
  colour: string;
  /** draw the median line (default true) */
  line?: boolean;
  /** draw the inner band when the points have one (default true) */
  inner?: boolean;
}

export interface FanChartOptions {
  series: readonly FanSeries[];
  observed?: ReadonlyArray<{ date: string; value: number }>;
  reference?: { value: number };
  shade?: { from: string; to: string };
  yTitle: string;
  /** what the chart shows, in words (kept in the vega specification; the figure carries its own label) */
  description: string;
  width?: number;
  height?: number;
  /** log scale for counts that span orders of magnitude */
  logScale?: boolean;
}

/** Date axis shared by the report's time charts: UTC days, so no time zone shifts a date. */
export function dateX(title: string | null = null): Record<string, unknown> {
  return {
    field: 'date',
    type: 'temporal',
    title,
    scale: { type: 'utc' },
    axis: { format: '%-d %b', labelOverlap: true, labelFlush: true, tickCount: 8 },
  };
}

/** The vega-lite specification of a fan chart. */
export function fanChartSpec(o: FanChartOptions): ChartSpec {
  const height = o.height ?? SIZE.wide.height;
  const y = (field: string) => ({
    field,
    type: 'quantitative',
    title: o.yTitle,
    // a rotated title longer than the plot would stretch the chart's bounds
    axis: { titleLimit: height },
    scale: o.logScale === true ? { type: 'symlog', constant: 1 } : { zero: false, nice: true },
  });
  const layers: Array<Record<string, unknown>> = [];
  if (o.shade !== undefined) {
    layers.push({
      data: { values: [{ date: o.shade.from, end: o.shade.to }] },
      mark: { type: 'rect', color: COLOURS.nowcast, opacity: 0.35 },
      encoding: { x: dateX(), x2: { field: 'end' } },
    });
  }
  for (const s of o.series) {
    const values = s.points.filter((p) => Number.isFinite(p.mid));
    layers.push({
      data: { values },
      mark: { type: 'area', color: s.colour, opacity: BAND_OPACITY.outer },
      encoding: { x: dateX(), y: y('outerLo'), y2: { field: 'outerHi' } },
    });
    if (s.inner !== false && values.some((p) => p.innerLo !== null)) {
      layers.push({
        data: { values },
        mark: { type: 'area', color: s.colour, opacity: BAND_OPACITY.inner },
        encoding: { x: dateX(), y: y('innerLo'), y2: { field: 'innerHi' } },
      });
    }
    if (s.line !== false) {
      layers.push({
        data: { values },
        mark: { type: 'line', color: s.colour, strokeWidth: 1.8 },
        encoding: { x: dateX(), y: y('mid') },
      });
    }
  }
  if (o.reference !== undefined) {
    layers.push({
      data: { values: [{ ref: o.reference.value }] },
      mark: { type: 'rule', color: COLOURS.reference, strokeDash: [5, 3], strokeWidth: 1.4 },
      encoding: { y: { field: 'ref', type: 'quantitative' } },
    });
  }
  // an empty layer would leave its scales without an extent (a warning of the chart library)
  if (o.observed !== undefined && o.observed.some((p) => Number.isFinite(p.value))) {
    layers.push({
      data: { values: o.observed.filter((p) => Number.isFinite(p.value)) },
      mark: { type: 'circle', color: COLOURS.observed, size: 11, opacity: 0.85, aria: false },
      encoding: { x: dateX(), y: y('value') },
    });
  }
  return {
    description: o.description,
    width: o.width ?? SIZE.wide.width,
    height,
    config: CHART_CONFIG,
    layer: layers,
  } as unknown as ChartSpec;
}
