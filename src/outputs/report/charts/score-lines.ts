/**
 * A score against the forecast horizon, one line per prior set: how each set's forecasts lose
 * accuracy (or coverage) with the days ahead. An optional reference line marks the nominal
 * value (0.9 for the coverage of 90% intervals).
 */
import type { ChartSpec } from '../render.js';
import { CHART_CONFIG, COLOURS, SCENARIO_COLOURS, SIZE } from '../theme.js';

export interface ScoreLine {
  label: string;
  /** value at horizon 1, 2, ... (NaN: none) */
  values: readonly number[];
}

export interface ScoreLinesOptions {
  lines: readonly ScoreLine[];
  yTitle: string;
  description: string;
  reference?: number;
  /** fix the y axis to [0, 1] (shares) */
  share?: boolean;
}

export function scoreLinesSpec(o: ScoreLinesOptions): ChartSpec {
  const rows = o.lines.flatMap((l) => l.values.map((v, i) => ({ set: l.label, horizon: i + 1, value: v })).filter((r) => Number.isFinite(r.value)));
  const colour = {
    field: 'set',
    type: 'nominal',
    scale: { domain: o.lines.map((l) => l.label), range: o.lines.map((_, i) => SCENARIO_COLOURS[i % SCENARIO_COLOURS.length]) },
    legend: null,
  };
  const x = { field: 'horizon', type: 'quantitative', title: 'days ahead', axis: { tickMinStep: 1, format: 'd' } };
  const y = { field: 'value', type: 'quantitative', title: o.yTitle, axis: { titleLimit: SIZE.half.height }, scale: o.share === true ? { domain: [0, 1] } : { zero: true, nice: true } };
  const layers: Array<Record<string, unknown>> = [
    { data: { values: rows }, mark: { type: 'line', strokeWidth: 1.8 }, encoding: { x, y, color: colour } },
    { data: { values: rows }, mark: { type: 'point', filled: true, size: 28 }, encoding: { x, y, color: colour, shape: { field: 'set', type: 'nominal', legend: null } } },
  ];
  if (o.reference !== undefined) {
    layers.push({
      data: { values: [{ ref: o.reference }] },
      mark: { type: 'rule', color: COLOURS.reference, strokeDash: [5, 3], strokeWidth: 1.4 },
      encoding: { y: { field: 'ref', type: 'quantitative' } },
    });
  }
  return { description: o.description, width: SIZE.half.width, height: SIZE.half.height, config: CHART_CONFIG, layer: layers } as unknown as ChartSpec;
}
