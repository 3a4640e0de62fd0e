/**
 * Small multiples: one small fan chart per region, on shared axes, so that levels and trends
 * compare at a glance (one quantity, many places). Declarative vega-lite (a facet of the
 * fan chart's layers); the chart library draws it.
 */
import type { ChartSpec } from '../render.js';
import { BAND_OPACITY, CHART_CONFIG, COLOURS } from '../theme.js';
import { dateX, type FanPoint } from './fan.js';

export interface PanelSeries {
  /** the panel's title (a region name) */
  name: string;
  points: readonly FanPoint[];
}

export interface SmallMultiplesOptions {
  panels: readonly PanelSeries[];
  yTitle: string;
  /** a horizontal line in every panel (R = 1) */
  reference?: number;
  /** the shared y range; values beyond it are cut at its edge */
  yDomain: [number, number];
  columns: number;
  description: string;
  width?: number;
  height?: number;
}

/** The vega-lite specification of the small multiples, panels in the order given. */
export function smallMultiplesSpec(o: SmallMultiplesOptions): ChartSpec {
  const values = o.panels.flatMap((p) => p.points.filter((x) => Number.isFinite(x.mid)).map((x) => ({ panel: p.name, ...x })));
  const y = (field: string) => ({
    field,
    type: 'quantitative',
    title: o.yTitle,
    scale: { domain: o.yDomain, clamp: true, nice: false },
  });
  const withInner = values.some((v) => v.innerLo !== null);
  const layers: Array<Record<string, unknown>> = [
    { mark: { type: 'area', color: COLOURS.estimate, opacity: BAND_OPACITY.outer, clip: true }, encoding: { x: dateX(), y: y('outerLo'), y2: { field: 'outerHi' } } },
    ...(withInner ? [{ mark: { type: 'area', color: COLOURS.estimate, opacity: BAND_OPACITY.inner, clip: true }, encoding: { x: dateX(), y: y('innerLo'), y2: { field: 'innerHi' } } }] : []),
    { mark: { type: 'line', color: COLOURS.estimate, strokeWidth: 1.5, clip: true }, encoding: { x: dateX(), y: y('mid') } },
  ];
  if (o.reference !== undefined) {
    layers.push({ mark: { type: 'rule', color: COLOURS.reference, strokeDash: [4, 3], strokeWidth: 1.2 }, encoding: { y: { datum: o.reference, type: 'quantitative' } } });
  }
  return {
    description: o.description,
    data: { values },
    facet: {
      field: 'panel',
      type: 'nominal',
      title: null,
      sort: o.panels.map((p) => p.name),
      header: { labelLimit: (o.width ?? 230) + 20, labelFontSize: 12, labelFontWeight: 600, labelAnchor: 'start' },
    },
    columns: o.columns,
    spec: { width: o.width ?? 230, height: o.height ?? 110, layer: layers },
    resolve: { scale: { x: 'shared', y: 'shared' } },
    config: CHART_CONFIG,
  } as unknown as ChartSpec;
}
