/**
 * Diagnostics: the convergence verdict in words, the parameters that mix worst (R-hat, bulk and
 * tail ESS, MCSE), and for the worst few their trace and rank plots from draws.csv.
 */
import { CONVERGENCE } from '../../summary.js';
import { rankBinCount, rankSpec, traceSpec } from '../charts/mixing.js';
import { figure, html, join, keyList, note, num, table, type Column, type Html, type KeyEntry } from '../html.js';
import type { DiagnosticRecord, RunFolder } from '../run-folder.js';
import type { ReportContext, Section } from '../section.js';
import { CHAIN_COLOURS, COLOURS } from '../theme.js';

/** Parameters plotted, and listed in the table. */
const PLOTTED = 4;
const LISTED = 10;

function fails(d: DiagnosticRecord): boolean {
  return !(d.rhat <= CONVERGENCE.maxRhat && d.ess_bulk >= CONVERGENCE.minEss && d.ess_tail >= CONVERGENCE.minEss);
}

/**
 * Parameters from worst to best mixing: highest R-hat first (NaN counts as worst), then the
 * lowest of bulk and tail ESS.
 */
export function worstMixing(rows: readonly DiagnosticRecord[]): DiagnosticRecord[] {
  const rhat = (d: DiagnosticRecord) => (Number.isNaN(d.rhat) ? Infinity : d.rhat);
  const ess = (d: DiagnosticRecord) => Math.min(Number.isNaN(d.ess_bulk) ? -Infinity : d.ess_bulk, Number.isNaN(d.ess_tail) ? -Infinity : d.ess_tail);
  return [...rows].sort((a, b) => rhat(b) - rhat(a) || ess(a) - ess(b));
}

/** The verdict box shown in the page header and at the top of this section. */
export function convergenceStatus(folder: RunFolder): Html {
  const { run, diagnostics } = folder;
  const failing = diagnostics === null ? null : diagnostics.filter(fails).length;
  const detail =
    diagnostics === null
      ? ''
      : html` Worst R-hat ${num(Math.max(...diagnostics.map((d) => (Number.isNaN(d.rhat) ? Infinity : d.rhat))), 4)}, lowest bulk ESS ${num(Math.min(...diagnostics.map((d) => d.ess_bulk)), 3)}, lowest tail ESS ${num(Math.min(...diagnostics.map((d) => d.ess_tail)), 3)}; ${failing} of ${diagnostics.length} parameters miss the rule.`;
  return run.converged
    ? html`<div class="status ok" role="status"><strong><span aria-hidden="true">&#10003;</span> Converged.</strong> The rule is met (${run.convergenceRule}).${detail}</div>`
    : html`<div class="status bad" role="alert"><strong><span aria-hidden="true">&#10007;</span> NOT converged.</strong> The rule (${run.convergenceRule}) is not met, so the chains may not describe the posterior: run longer (--warmup, --draws, --thin) before using these results.${detail}</div>`;
}

function chainKey(chains: readonly number[]): KeyEntry[] {
  return chains.map((c, i) => ({ kind: 'line', colour: CHAIN_COLOURS[i % CHAIN_COLOURS.length], label: `chain ${c}` }));
}

export async function diagnosticsSection(ctx: ReportContext): Promise<Section> {
  const { folder } = ctx;
  const { diagnostics, draws } = folder;
  const status = convergenceStatus(folder);
  if (diagnostics === null) {
    return { id: 'diagnostics', title: 'Diagnostics', body: html`${status}${note('diagnostics.csv is not in the run folder, so no per-parameter diagnostics are shown.')}` };
  }
  const ordered = worstMixing(diagnostics);
  const columns: Column<DiagnosticRecord>[] = [
    { head: 'parameter', cell: (d) => html`<code>${d.parameter}</code>` },
    { head: 'R-hat', numeric: true, cell: (d) => num(d.rhat, 4) },
    { head: 'bulk ESS', numeric: true, cell: (d) => num(d.ess_bulk, 4) },
    { head: 'tail ESS', numeric: true, cell: (d) => num(d.ess_tail, 4) },
    { head: 'MCSE of the mean', numeric: true, cell: (d) => num(d.mcse_mean, 3) },
    { head: 'meets the rule', cell: (d) => (fails(d) ? html`<span class="flag">no</span>` : 'yes') },
  ];
  const acceptance = Array.isArray(folder.run.raw.acceptance) ? (folder.run.raw.acceptance as unknown[]) : [];
  const rates = acceptance
    .map((a, i) => (a !== null && typeof a === 'object' && typeof (a as { sampling?: unknown }).sampling === 'number' ? `chain ${i + 1}: ${num((a as { sampling: number }).sampling, 2)}` : null))
    .filter((x): x is string => x !== null);
  let plots: Html;
  if (draws === null) {
    plots = note('draws.csv is not in the run folder, so no trace or rank plots are drawn.');
  } else {
    const chains = [...new Set(Array.from(draws.chain))].sort((a, b) => a - b);
    const perChain = Math.floor(draws.chain.length / Math.max(1, chains.length));
    const bins = rankBinCount(perChain);
    const shown = ordered.slice(0, PLOTTED).filter((d) => draws.values.has(d.parameter));
    const blocks: Html[] = [];
    for (const d of shown) {
      const values = draws.values.get(d.parameter)!;
      const trace = await ctx.chart(traceSpec(d.parameter, values, draws.chain));
      const rank = await ctx.chart(rankSpec(d.parameter, values, draws.chain, bins));
      blocks.push(
        html`<div class="mixing-row"><h4><code>${d.parameter}</code> <span class="muted">R-hat ${num(d.rhat, 4)}, bulk ESS ${num(d.ess_bulk, 3)}, tail ESS ${num(d.ess_tail, 3)}</span></h4><div class="pair">${figure(trace, {})}${figure(rank, {})}</div></div>`,
      );
    }
    plots = html`<h3>Trace and rank plots of the ${shown.length} worst-mixing parameters</h3>
${keyList([...chainKey(chains), { kind: 'dash', colour: COLOURS.reference, label: 'rank plot: height expected if the chains agree' }])}
<p class="caption">Left, the kept draws of each chain in order: well-mixed chains overlap as one band with no trend. Right, the draws of all chains ranked together and cut into ${bins} bins, counted per chain (Vehtari et al. 2021): well-mixed chains give flat lines near the dashed height; a chain above it at one end sits apart from the others.</p>
${join(blocks)}`;
  }
  return {
    id: 'diagnostics',
    title: 'Diagnostics',
    body: html`${status}${table(`The ${Math.min(LISTED, ordered.length)} parameters that mix worst, of ${ordered.length} (all in diagnostics.csv)`, columns, ordered.slice(0, LISTED), (d) => (fails(d) ? 'fail' : null))}${
      rates.length === 0 ? '' : html`<p>Acceptance rate while sampling (target near 0.234): ${rates.join('; ')}.</p>`
    }${plots}`,
  };
}
