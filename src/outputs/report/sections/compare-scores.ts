/**
 * The scores of a comparison: the ranking table, scores against the horizon (weighted
 * interval score and coverage of the 90% interval), and how the backtest was run, with the
 * convergence of every fit.
 */
import { scoreLinesSpec } from '../charts/score-lines.js';
import type { CompareContext } from '../compare-page.js';
import { figure, html, num, table, type Column, type KeyEntry } from '../html.js';
import type { FitRecordRow, RankingRecord, ScoreRecord } from '../compare-folder.js';
import type { Section } from '../section.js';
import { COLOURS } from '../theme.js';
import { setColour } from './compare-estimates.js';

/** The key of charts with one series per prior set. */
export function setKey(labels: readonly string[], kind: KeyEntry['kind'] = 'line'): KeyEntry[] {
  return labels.map((label, i) => ({ kind, colour: setColour(i), label }));
}

const pct = (x: number) => (Number.isFinite(x) ? `${num(100 * x, 3)}%` : 'n/a');

export async function compareScoresSection(ctx: CompareContext): Promise<Section> {
  const { folder } = ctx;
  const labels = folder.priorSets.map((p) => p.label);
  const columns: Column<RankingRecord>[] = [
    { head: 'rank', numeric: true, cell: (r) => String(r.rank) },
    { head: 'prior set', cell: (r) => html`<strong>${r.priorSet}</strong>` },
    { head: 'WIS', numeric: true, cell: (r) => num(r.wis, 4) },
    { head: html`above the best (se)<sup>*</sup>`, numeric: true, cell: (r) => (r.rank === 1 ? '—' : html`${num(r.wisVsBest, 2)} (${num(r.wisVsBestSe, 2)})`) },
    { head: 'CRPS', numeric: true, cell: (r) => num(r.crps, 4) },
    { head: 'log score', numeric: true, cell: (r) => num(r.logScore, 4) },
    { head: '50% cover', numeric: true, cell: (r) => pct(r.coverage50) },
    { head: '90% cover', numeric: true, cell: (r) => pct(r.coverage90) },
    { head: 'rank by CRPS, log score', numeric: true, cell: (r) => `${r.rankCrps}, ${r.rankLogScore}` },
  ];
  const byHorizon = (pick: (s: ScoreRecord) => number) =>
    labels.map((label) => {
      const rows = folder.scores.filter((s) => s.priorSet === label && s.horizon !== null).sort((a, b) => a.horizon! - b.horizon!);
      return { label, values: rows.map(pick) };
    });
  const wisSvg = await ctx.chart(scoreLinesSpec({ lines: byHorizon((s) => s.wis), yTitle: 'mean WIS (reports)', description: 'mean weighted interval score by days ahead, per prior set' }));
  const coverSvg = await ctx.chart(
    scoreLinesSpec({ lines: byHorizon((s) => s.coverage90), yTitle: 'in the 90% interval', description: 'coverage of the 90% prediction interval by days ahead, per prior set', reference: 0.9, share: true }),
  );
  const forecasts = folder.ranking[0]?.priorSet === undefined ? 0 : folder.scores.find((s) => s.priorSet === folder.ranking[0]!.priorSet && s.horizon === null)?.forecasts ?? 0;
  return {
    id: 'scores',
    title: 'Forecast scores and ranking',
    body: html`${table(`Prior sets ranked by the mean weighted interval score (WIS) of ${forecasts} backtest forecasts each; every score is a mean over those forecasts, lower is better`, columns, folder.ranking, undefined)}
<p class="footnote"><sup>*</sup> Mean over origins of the paired difference in WIS against the best set, with its standard error over the ${folder.origins.length} origins (a difference within about two standard errors is no clear difference).</p>
<p>The weighted interval score (Bracher, Ray, Gneiting and Reich 2021) and the CRPS (Gneiting and Raftery 2007) measure, in reports per day, how far the predictive distribution of the reported count fell from the count that came; the log score is minus the log of the probability the forecast gave that count. All three are proper: a forecaster does best on average by stating what it believes. Coverage says how often the count fell inside the central 50% and 90% prediction intervals; well-calibrated intervals cover about 50% and 90%.</p>
<div class="pair">${figure(wisSvg, { key: setKey(labels), caption: 'Mean WIS by days ahead: forecasts lose accuracy with the horizon.' })}${figure(coverSvg, {
      key: [...setKey(labels), { kind: 'dash', colour: COLOURS.reference, label: 'nominal 90%' }],
      caption: 'Share of counts inside the 90% prediction interval by days ahead.',
    })}</div>`,
  };
}

export async function compareBacktestSection(ctx: CompareContext): Promise<Section> {
  const { folder } = ctx;
  const options = folder.raw.options as Record<string, unknown>;
  const full = folder.fits.filter((f) => f.fit === 'all');
  const columns: Column<FitRecordRow>[] = [
    { head: 'prior set', cell: (r) => r.priorSet },
    { head: 'seconds', numeric: true, cell: (r) => num(r.seconds, 3) },
    { head: 'max R-hat', numeric: true, cell: (r) => num(r.maxRhat, 4) },
    { head: 'min bulk ESS', numeric: true, cell: (r) => num(r.minEssBulk, 3) },
    { head: 'min tail ESS', numeric: true, cell: (r) => num(r.minEssTail, 3) },
    { head: 'converged', cell: (r) => (r.converged ? 'yes' : html`<span class="flag">NOT converged</span>`) },
  ];
  const backtestRows = folder.priorSets.map((p) => {
    const fits = folder.fits.filter((f) => f.priorSet === p.label && f.fit === 'backtest');
    return {
      priorSet: p.label,
      fits: fits.length,
      seconds: fits.reduce((a, f) => a + f.seconds, 0),
      worstRhat: Math.max(...fits.map((f) => f.maxRhat)),
      fewestEss: Math.min(...fits.map((f) => f.minEssBulk)),
    };
  });
  const backtestColumns: Column<(typeof backtestRows)[number]>[] = [
    { head: 'prior set', cell: (r) => r.priorSet },
    { head: 'fits', numeric: true, cell: (r) => String(r.fits) },
    { head: 'seconds in all', numeric: true, cell: (r) => num(r.seconds, 3) },
    { head: 'worst max R-hat', numeric: true, cell: (r) => num(r.worstRhat, 4) },
    { head: 'lowest min bulk ESS', numeric: true, cell: (r) => num(r.fewestEss, 3) },
  ];
  return {
    id: 'backtest',
    title: 'How the backtest was run',
    body: html`<p>Origins every ${String(options.every)} days, from ${folder.origins[0] ?? '—'} to ${folder.origins[folder.origins.length - 1] ?? '—'} (${folder.origins.length} origins): at each, the model was fitted under each prior set to the data up to that day only, and the fit forecast the next ${folder.horizon} days with the random walk on log beta carried on, exactly as <code>waxwane forecast</code> does. Every set met the same random numbers at the same origin. The backtest fits are short (${String(options.backtest_warmup)} warm-up iterations, ${String(options.backtest_draws)} draws kept every ${String(options.backtest_thin)} iterations per chain): enough for forecast scores, not for every tail quantile, so they are not held to the convergence rule.</p>
${table('Fits on every day (their estimates are shown above)', columns, full, (r) => (r.converged ? null : 'weak'))}
${table('Backtest fits (one per origin; fits.csv lists each)', backtestColumns, backtestRows)}`,
  };
}

