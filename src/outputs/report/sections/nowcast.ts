/**
 * The nowcast (nowcast.csv, written by a forecast run): one fan chart per quantity when the
 * file is in long form (quantity, date, mean, sd, quantiles), otherwise the table as it is.
 * Without the file, a note says where it would come from.
 */
import { fanChartSpec } from '../charts/fan.js';
import { figure, html, join, note, type Html } from '../html.js';
import type { QuantileTable } from '../run-folder.js';
import type { ReportContext } from '../section.js';
import { fanSeries } from '../series.js';
import { COLOURS } from '../theme.js';
import { fanKey } from './trajectories.js';
import { textTable } from './text-table.js';

/** Quantities of nowcast.csv drawn, with axis titles and captions; the others are listed. */
const DRAWN: ReadonlyArray<[string, string, string]> = [
  ['reports_to_come', 'reports to come', 'Reports of these onset days that have not arrived by the last observed day: the correction a reader should add to the latest counts.'],
  ['reported_share', 'share already reported', 'Share of each onset day\'s eventual reports that had arrived by the last observed day: near 1 for older days, small for the latest.'],
  ['onsets', 'onsets per day', 'Onsets (the moment a case becomes infectious) that have already happened on each of these days.'],
];

function isQuantileTable(x: unknown): x is QuantileTable {
  return typeof x === 'object' && x !== null && 'levels' in x;
}

export async function nowcastBlock(ctx: ReportContext): Promise<Html> {
  const nowcast = ctx.folder.nowcast;
  if (nowcast === null) {
    return note('No nowcast.csv in this run folder: the estimate of reports still to come for the shaded days appears here when a forecast run has written it.');
  }
  if (!isQuantileTable(nowcast)) return html`<h3>Nowcast</h3>${textTable(nowcast, 'nowcast.csv')}`;
  const present = [...new Set(nowcast.rows.map((r) => r.quantity))];
  const drawn = DRAWN.filter(([q]) => present.includes(q));
  const listed = present.filter((q) => !DRAWN.some(([k]) => k === q));
  const figures: Html[] = [];
  for (const [q, label, caption] of drawn) {
    const points = fanSeries(nowcast, q);
    if (points.length === 0) continue;
    const svg = await ctx.chart(fanChartSpec({ series: [{ points, colour: COLOURS.estimate }], yTitle: label, description: `nowcast: ${label}`, height: 170 }));
    figures.push(figure(svg, { key: fanKey(nowcast.levels, label), caption }));
  }
  return html`<h3>Nowcast of the shaded days</h3>${figures.length === 0 ? note('nowcast.csv has none of the quantities drawn here.') : join(figures)}${
    listed.length === 0 ? '' : html`<p class="caption">Also in nowcast.csv: ${join(listed.map((q) => html`<code>${q}</code>`), ', ')}.</p>`
  }`;
}
