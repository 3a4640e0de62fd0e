/**
 * Details of a comparison (input and its hash, each prior set with its description and
 * sources, options, versions, timings) and its cautions for public-health use.
 */
import type { CompareContext } from '../compare-page.js';
import { html, num } from '../html.js';
import type { Section } from '../section.js';
import { pairs, showValue } from './details.js';

const obj = (v: unknown): Record<string, unknown> => (v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : {});

export async function compareDetailsSection(ctx: CompareContext): Promise<Section> {
  const { folder } = ctx;
  const { input, raw } = folder;
  const inputPairs = pairs([
    ['data file', input.file],
    ['SHA-256 of the data file', html`<code class="hash">${input.sha256}</code>`],
    ['region', input.region ?? '— (the file has one series)'],
    ['days', `${input.firstDate} to ${input.lastDate} (${input.days} days)`],
    ['population', num(input.population, 10)],
  ]);
  const options = pairs([
    ['command', 'waxwane compare'],
    ...Object.entries(obj(raw.options)).map(([k, v]) => [html`<code>${k}</code>`, showValue(v)] as const),
    ['threads', showValue(raw.threads)],
  ]);
  const sets = folder.priorSets.map(
    (p) => html`<h4>${p.label} <span class="muted">(from ${p.file})</span></h4><p>${p.set.description}</p><details><summary>Sources of the prior values (${p.set.sources.length})</summary><ul class="sources">${p.set.sources.map((s) => html`<li>${s}</li>`)}</ul></details>`,
  );
  const versions = pairs(Object.entries(obj(raw.versions)).map(([k, v]) => [k, showValue(v)] as const));
  const timings = pairs(Object.entries(obj(raw.timings_seconds)).map(([k, v]) => [k, `${showValue(v)} s`] as const));
  return {
    id: 'details',
    title: 'Run details',
    body: html`<div class="details-grid">
<div><h3>Input</h3>${inputPairs}</div>
<div><h3>Options</h3>${options}</div>
<div><h3>Prior sets</h3>${sets}</div>
<div><h3>Versions and timings</h3>${versions}${timings}</div>
</div>
<p>Files in the folder: <code>scores.csv</code>, <code>ranking.csv</code>, <code>backtest.csv</code> (every scored forecast), <code>estimates.csv</code>, <code>identification.csv</code>, <code>fits.csv</code>, <code>compare.json</code>.</p>`,
  };
}

export async function compareCautionsSection(ctx: CompareContext): Promise<Section> {
  const { folder } = ctx;
  const notConverged = folder.fits.filter((f) => f.fit === 'all' && !f.converged).map((f) => f.priorSet);
  return {
    id: 'cautions',
    title: 'Cautions for public-health use',
    body: html`<div class="caution-box">
<p><strong>${folder.caution}</strong></p>
<ul>
<li>The ranking scores forecasts of reported counts over ${folder.origins.length} origins in the last weeks of these data. A prior set that forecast these weeks best may not serve another place, another phase of the epidemic, or another question (the level of R_t rather than next week's counts).</li>
<li>With few origins the ranking is noisy: read the standard errors beside the differences, and prefer the simpler or more cautious set when the scores are close.</li>
<li>Scores in reports per day weigh the busiest days most; a set that does well in a lull and badly at a peak can still rank first on a window that is mostly lull.</li>
<li>Every estimate rests on the model's assumptions (SEIR dynamics, a smoothly changing transmission rate, a fixed reporting delay, a constant share of onsets reported). Credible and prediction intervals describe uncertainty within the model, not errors in the data or in the model's structure.</li>
${notConverged.length === 0 ? html`<li>Every fit on all days met the convergence rule.</li>` : html`<li><strong>Did NOT converge:</strong> the fit on every day under ${notConverged.join(', ')}; do not use its estimates before a longer run converges.</li>`}
<li>This report informs decisions; it does not replace local public-health authority and the judgement of trained epidemiologists.</li>
</ul>
</div>`,
  };
}
