/**
 * `waxwane prior-check PRIORS --population N --days T`: simulates many epidemics from a prior
 * set alone (no data) and says what the prior implies: the range of R_t, the peak of daily
 * reports, the total reports, the attack rate, and the share of draws with outcomes no
 * epidemic shows (more reports than people, everyone infected, R_t beyond a bound), flagged
 * when they carry too much of the prior's mass. Prints a summary; with --out also writes the
 * tables.
 */
import { basename } from 'node:path';
import { WaxwaneError } from '../errors.js';
import { MAX_POPULATION } from '../io/cases.js';
import { resolvePriorSet, resolvePriorSetPath } from '../io/priors.js';
import { prepareOutputDir, OutputSet } from '../io/atomic.js';
import { column, longCsv, summarizeDraws, type LongRow } from '../outputs/draw-summary.js';
import { formatNumber } from '../outputs/format.js';
import { VERSION } from '../version.js';
import { priorCheck, PRIOR_CHECK_QUANTITIES, PRIOR_DAILY_QUANTITIES, type PriorCheckQuantity, type PriorCheckResult } from '../evaluation/prior-check.js';
import type { Reporter } from './reporter.js';

export interface PriorCheckCliOptions {
  population: number;
  days: number;
  draws: number;
  seed: number;
  maxReproduction: number;
  quantiles: number[];
  out?: string;
  force: boolean;
  quiet: boolean;
}

export const PRIOR_CHECK_FILES = ['prior-check.csv', 'prior-daily.csv', 'prior-check.json'] as const;

const LABELS: Record<PriorCheckQuantity, string> = {
  max_basic_reproduction: 'highest R_0(t) = beta D',
  max_effective_reproduction: 'highest R_t over the days',
  min_effective_reproduction: 'lowest R_t over the days',
  last_effective_reproduction: 'R_t on the last day',
  peak_reports: 'most reports on one day',
  peak_reports_day: 'day of the most reports',
  total_reports: 'reports over all days',
  reports_per_person: 'reports per person',
  attack_rate: 'share of the population infected',
};

export function runPriorCheck(priors: string, o: PriorCheckCliOptions, reporter: Reporter): number {
  if (!(o.population <= MAX_POPULATION)) throw new WaxwaneError(`--population ${o.population} is above ${MAX_POPULATION}; give the population of one place`);
  const path = resolvePriorSetPath(priors);
  const set = resolvePriorSet(priors);
  if (o.out !== undefined) prepareOutputDir(o.out, { force: o.force });
  reporter.info(`prior set ${set.name}: ${o.draws} epidemics of ${o.days} days in a population of ${formatNumber(o.population, 12)}, drawn from the prior alone`);
  const result = priorCheck(set, { days: o.days, population: o.population, draws: o.draws, seed: o.seed, maxReproduction: o.maxReproduction, firstWeekday: 0 });
  const levels = o.quantiles;
  const summaryRows: LongRow[] = PRIOR_CHECK_QUANTITIES.map((q) => ({ keys: [q], summary: summarizeDraws(result.perDraw[q], levels) }));
  const warnings = result.findings.filter((f) => f.flagged).map((f) => `${pct(f.share)} of the prior's epidemics: ${f.description} (flagged above ${pct(f.flagAbove!)}); the prior set or the population may need another look`);

  if (o.out !== undefined) {
    const out = new OutputSet(o.out);
    out.add('prior-check.csv', longCsv(['quantity'], summaryRows, levels));
    out.add('prior-daily.csv', longCsv(['quantity', 'day'], dailyRows(result, o.days, levels), levels));
    out.add(
      'prior-check.json',
      JSON.stringify(
        {
          tool: 'waxwane',
          version: VERSION,
          command: 'prior-check',
          priors: { file: basename(path), set },
          options: { population: o.population, days: o.days, draws: o.draws, seed: o.seed, max_reproduction: o.maxReproduction, quantiles: levels, first_weekday: 'Monday' },
          failed_draws: result.failed,
          findings: result.findings.map((f) => ({ name: f.name, description: f.description, share: f.share, flag_above: f.flagAbove, flagged: f.flagged })),
          flagged: result.findings.filter((f) => f.flagged).map((f) => f.name),
          warnings,
        },
        null,
        2,
      ) + '\n',
    );
    out.commit();
  }

  const lo = levels[0]!;
  const hi = levels[levels.length - 1]!;
  const width = Math.max(...PRIOR_CHECK_QUANTITIES.map((q) => LABELS[q].length));
  const lines = [`what the prior implies (median and ${formatNumber(lo * 100, 4)}-${formatNumber(hi * 100, 4)}% range over the draws):`];
  for (const row of summaryRows) {
    const q = row.summary.quantiles;
    const mid = summarizeDraws(result.perDraw[row.keys[0] as PriorCheckQuantity], [0.5]).quantiles[0]!;
    lines.push(`  ${LABELS[row.keys[0] as PriorCheckQuantity].padEnd(width)}  ${formatNumber(mid, 3).padStart(10)}  [${formatNumber(q[0]!, 3)}, ${formatNumber(q[q.length - 1]!, 3)}]`);
  }
  lines.push('outcomes no epidemic shows, as a share of the draws:');
  for (const f of result.findings) {
    lines.push(`  ${f.flagged ? 'FLAG' : f.flagAbove === null ? '    ' : 'ok  '}  ${pct(f.share).padStart(6)}  ${f.description}${f.flagAbove === null ? '' : ` (flagged above ${pct(f.flagAbove)})`}`);
  }
  reporter.info(lines.join('\n'));
  for (const w of warnings) reporter.warn(w);
  if (o.out !== undefined) reporter.info(`outputs in ${o.out}/ (${PRIOR_CHECK_FILES.join(', ')})`);
  return 0;
}

function pct(x: number): string {
  return `${formatNumber(100 * x, 3)}%`;
}

/** prior-daily.csv rows: each daily quantity on each day (1 = the first simulated observed day). */
function dailyRows(result: PriorCheckResult, days: number, levels: readonly number[]): LongRow[] {
  const rows: LongRow[] = [];
  const col = new Float64Array(result.draws);
  for (const q of PRIOR_DAILY_QUANTITIES) {
    for (let t = 0; t < days; t++) {
      column(result.daily[q], days, t, col);
      rows.push({ keys: [q, String(t + 1)], summary: summarizeDraws(col, levels) });
    }
  }
  return rows;
}
