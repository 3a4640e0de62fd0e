/**
 * Forecast scenarios side by side (forecast.csv: scenario, quantity, date, mean, sd,
 * quantiles), one row of panels per quantity, and the scenario table (scenarios.csv) as it is.
 * Without forecast.csv the section says how to get one.
 */
import { addDays } from '../../../io/dates.js';
import { scenarioPanelsSpec } from '../charts/scenarios.js';
import { figure, html, intervalName, join, keyList, note, num, table, type Column, type Html, type KeyEntry } from '../html.js';
import { levelOfColumn, type TextTable } from '../csv.js';
import type { ReportContext, Section } from '../section.js';
import { bandLevels, fanSeries } from '../series.js';
import { BAND_OPACITY, COLOURS, SCENARIO_COLOURS } from '../theme.js';
import { textTable } from './text-table.js';

/** Quantities drawn, in page order, with their axis titles; the others of forecast.csv are listed. */
const DRAWN: ReadonlyArray<[quantity: string, heading: string, axis: string]> = [
  ['predicted_reports', 'Reported cases per day (posterior predictive)', 'reports per day'],
  ['infections', 'New infections per day', 'infections per day'],
  ['effective_reproduction', 'Effective reproduction number R_t', 'R_t'],
];

/** Quantities whose past is drawn with the observed counts. */
const REPORT_QUANTITIES = new Set(['predicted_reports', 'expected_reports']);

/** Days of the fit shown before the forecast. */
const CONTEXT_DAYS = 42;

export async function forecastSection(ctx: ReportContext): Promise<Section> {
  const { forecast, summary, data, run, scenarios: scenarioTable } = ctx.folder;
  const tableBlock = scenarioTable === null ? '' : html`<h3>Scenario outcomes over the horizon</h3>${scenarioOutcomes(scenarioTable)}`;
  if (forecast === null) {
    return {
      id: 'forecast',
      title: 'Forecast scenarios',
      body: html`${note('No forecast.csv in this run folder: this run made no forecast. A forecast run on this folder adds the scenarios here.')}${tableBlock}`,
    };
  }
  const scenarios = [...new Set(forecast.rows.map((r) => r.scenario))];
  const present = [...new Set(forecast.rows.map((r) => r.quantity))];
  const drawn = DRAWN.filter(([q]) => present.includes(q));
  const listed = present.filter((q) => !DRAWN.some(([k]) => k === q));
  const last = run.input.lastDate;
  const since = addDays(last, -(CONTEXT_DAYS - 1));
  const b = bandLevels(forecast.levels);
  const figures: Html[] = [];
  for (const [q, heading, axis] of drawn) {
    const past = fanSeries(summary, q).filter((p) => p.date >= since);
    const observed = REPORT_QUANTITIES.has(q) ? (data ?? []).filter((d) => d.cases !== null && d.date >= since).map((d) => ({ date: d.date, value: d.cases as number })) : [];
    const svg = await ctx.chart(
      scenarioPanelsSpec({
        scenarios,
        forecast: scenarios.map((s) => fanSeries(forecast, q, s)),
        past,
        observed,
        lastObserved: last,
        yTitle: axis,
        ...(q === 'effective_reproduction' ? { reference: 1 } : {}),
      }),
    );
    figures.push(html`<h3>${heading}</h3>${figure(svg, { className: 'wide' })}`);
  }
  const key: KeyEntry[] = [
    { kind: 'band', colour: COLOURS.context, opacity: BAND_OPACITY.inner + 0.1, label: `fit to date (last ${CONTEXT_DAYS} days)` },
    ...scenarios.map((s, i) => ({ kind: 'band' as const, colour: SCENARIO_COLOURS[i % SCENARIO_COLOURS.length], opacity: BAND_OPACITY.inner + 0.1, label: `scenario ${s}` })),
    { kind: 'dot', colour: COLOURS.observed, label: 'reported cases' },
    { kind: 'dash', colour: '#555555', label: `last observed day (${last})` },
  ];
  const keyHtml = keyList(key);
  return {
    id: 'forecast',
    title: 'Forecast scenarios',
    body: html`<p>${scenarios.length} scenario${scenarios.length === 1 ? '' : 's'} over ${new Set(forecast.rows.map((r) => r.date)).size} days past ${last}; bands are the ${b.innerName ?? b.outerName}${b.innerName === null ? '' : ` and ${b.outerName}`} intervals around the ${b.midName}. Panels share their axes, so heights compare directly. Forecasts assume the model and the scenario hold; uncertainty grows with the horizon.</p>${scenarioList(ctx, scenarios)}${keyHtml}${join(figures)}${
      listed.length === 0 ? '' : html`<p class="caption">Also in forecast.csv: ${join(listed.map((q) => html`<code>${q}</code>`), ', ')}.</p>`
    }${tableBlock}`,
  };
}

/** The scenarios as forecast.json describes them (name: description). */
function scenarioList(ctx: ReportContext, names: readonly string[]): Html {
  const rec = ctx.folder.forecastRecord;
  const list = rec !== null && Array.isArray(rec.scenarios) ? (rec.scenarios as unknown[]) : [];
  const described = new Map<string, string>();
  for (const s of list) {
    if (s !== null && typeof s === 'object' && typeof (s as { name?: unknown }).name === 'string') {
      const d = (s as { description?: unknown }).description;
      described.set((s as { name: string }).name, typeof d === 'string' ? d : '');
    }
  }
  if (described.size === 0) return html``;
  return html`<ul class="scenario-list">${names.map((n) => html`<li><strong>${n}</strong>${described.get(n) ? html`: ${described.get(n)}` : ''}</li>`)}</ul>`;
}

/** Readable names of the rows of scenarios.csv. */
const OUTCOME_LABELS: Record<string, string> = {
  peak_reports_day: 'day of the peak of reported cases',
  peak_reports: 'peak reported cases per day',
  peak_infections_day: 'day of the peak of infections',
  peak_infections: 'peak infections per day',
  cumulative_infections: 'infections over the horizon',
  cumulative_reports: 'reported cases over the horizon',
  averted_infections: 'infections averted against the first scenario',
  averted_share: 'share of infections averted',
};

/**
 * scenarios.csv as a table with one column per scenario: each cell the median and outer
 * interval, dates for the `_day` rows. A table of another layout is shown as it is.
 */
export function scenarioOutcomes(t: TextTable): Html {
  const qcols = t.columns.map((c) => ({ c, p: levelOfColumn(c) })).filter((x): x is { c: string; p: number } => x.p !== null).sort((a, b) => a.p - b.p);
  if (!t.columns.includes('scenario') || !t.columns.includes('quantity') || qcols.length < 2) return textTable(t, 'scenarios.csv');
  const lo = qcols[0].c;
  const hi = qcols[qcols.length - 1].c;
  const mid = qcols.find((x) => Math.abs(x.p - 0.5) < 1e-12)?.c ?? 'mean';
  const band = intervalName(qcols[0].p, qcols[qcols.length - 1].p);
  const scenario = t.column('scenario');
  const quantity = t.column('quantity');
  const names = [...new Set(scenario)];
  const quantities = [...new Set(quantity)];
  const cell = new Map<string, number>();
  scenario.forEach((s, i) => cell.set(`${s}\u0000${quantity[i]}`, i));
  const field = (c: string, i: number) => (t.columns.includes(c) ? t.column(c)[i] : '');
  const show = (q: string, s: string): Html => {
    const i = cell.get(`${s}\u0000${q}`);
    if (i === undefined) return html`<span class="muted">—</span>`;
    if (q.endsWith('_day') && field(`date_${mid}`, i) !== '') return html`${field(`date_${mid}`, i)}<br><span class="muted">${field(`date_${lo}`, i)} to ${field(`date_${hi}`, i)}</span>`;
    const n = (c: string) => num(Number(field(c, i)), 3);
    return html`${n(mid)}<br><span class="muted">${n(lo)} to ${n(hi)}</span>`;
  };
  const columns: Column<string>[] = [
    { head: 'outcome', cell: (q) => html`${OUTCOME_LABELS[q] ?? q}<br><code>${q}</code>` },
    ...names.map((s) => ({ head: s, numeric: true, cell: (q: string) => show(q, s) })),
  ];
  return table(`Median and ${band} interval per scenario (scenarios.csv)`, columns, quantities);
}
