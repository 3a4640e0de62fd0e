/**
 * Reported counts: the data as dots, the expected reports (mu_t) as a fan, and the posterior
 * predictive reports (with negative-binomial noise) as a light band; with the share of days
 * whose count falls inside the predictive interval, a plain check of the fit.
 */
import { fanChartSpec } from '../charts/fan.js';
import { figure, html, note, num, type KeyEntry } from '../html.js';
import type { ReportContext, Section } from '../section.js';
import { bandLevels, fanSeries } from '../series.js';
import { BAND_OPACITY, COLOURS } from '../theme.js';

export async function countsSection(ctx: ReportContext): Promise<Section> {
  const { folder } = ctx;
  const b = bandLevels(folder.summary.levels);
  const expected = fanSeries(folder.summary, 'expected_reports');
  const predicted = fanSeries(folder.summary, 'predicted_reports');
  const observed = (folder.data ?? []).filter((d) => d.cases !== null).map((d) => ({ date: d.date, value: d.cases as number }));
  const svg = await ctx.chart(
    fanChartSpec({
      series: [
        { points: predicted, colour: COLOURS.predictive, line: false, inner: false },
        { points: expected, colour: COLOURS.estimate },
      ],
      observed,
      yTitle: 'reports per day',
      description: 'reported cases per day with fitted and predicted reports',
    }),
  );
  const key: KeyEntry[] = [
    { kind: 'dot', colour: COLOURS.observed, label: 'reported cases' },
    { kind: 'line', colour: COLOURS.estimate, label: `expected reports, ${b.midName}` },
    { kind: 'band', colour: COLOURS.estimate, opacity: BAND_OPACITY.inner + 0.1, label: `expected reports, ${b.innerName ?? b.outerName} and ${b.outerName} intervals` },
    { kind: 'band', colour: COLOURS.predictive, opacity: BAND_OPACITY.outer + 0.15, label: `predicted reports, ${b.outerName} interval` },
  ];
  // posterior predictive coverage: how many observed counts fall in the predictive interval
  const byDate = new Map(predicted.map((p) => [p.date, p]));
  let inside = 0;
  let counted = 0;
  for (const o of observed) {
    const p = byDate.get(o.date);
    if (p === undefined) continue;
    counted++;
    if (o.value >= p.outerLo && o.value <= p.outerHi) inside++;
  }
  const coverage =
    counted === 0
      ? note('No observed counts to compare (data.csv is missing from the run folder).')
      : html`<p>${inside} of ${counted} observed days (${num((100 * inside) / counted, 3)}%) fall inside the ${b.outerName} predictive interval; a model that describes the data well puts about ${b.outerName} of the days inside it.</p>`;
  return {
    id: 'counts',
    title: 'Reported cases',
    body: html`${figure(svg, {
      key,
      caption: html`Expected reports are the model's mean count on each day (onsets, delayed and scaled by the ascertainment). Predicted reports add the day-to-day noise of the negative-binomial model: they show where new counts would fall if the model is right.`,
    })}${coverage}${folder.data === null ? note('data.csv is not in the run folder, so the reported counts are not drawn.') : ''}`,
  };
}
