/**
 * The cautions for public-health use: the run's own caution (run.json), what this run's
 * warnings mean, and the limits every reader should keep in mind.
 */
import { html } from '../html.js';
import type { ReportContext, Section } from '../section.js';

export async function cautionsSection(ctx: ReportContext): Promise<Section> {
  const { run } = ctx.folder;
  const weak = run.identification.filter((i) => i.weak).map((i) => i.parameter);
  return {
    id: 'cautions',
    title: 'Cautions for public-health use',
    body: html`<div class="caution-box">
<p><strong>${run.caution}</strong></p>
<ul>
<li>Every number in this report is a model-based estimate. It assumes SEIR dynamics in a well-mixed population, a transmission rate that changes smoothly from one ${run.priorSet.model.knot_days}-day knot to the next, an onset-to-report delay of fixed shape (${run.priorSet.model.delay.family}, mean ${run.priorSet.model.delay.mean} days, sd ${run.priorSet.model.delay.sd} days), a constant share of onsets reported, and the prior set "${run.priorSet.name}". Changes in testing or reporting, backlogs, imported cases or very uneven mixing break these assumptions, and the estimates can then be wrong while their intervals stay narrow.</li>
<li>Credible intervals describe uncertainty within the model. They do not cover errors in the data or in the model's structure.</li>
<li>The most recent days rest on incomplete reports (the nowcast window): expect them to move as later reports arrive.</li>
${weak.length === 0 ? '' : html`<li>Weakly identified in this run: ${weak.join(', ')}. Their intervals mostly restate the prior; conclusions that depend on them (for instance the absolute number of infections, which scales with the ascertainment) should be stated with that caveat.</li>`}
<li>${run.converged ? 'The chains met the convergence rule.' : html`<strong>The chains did NOT converge:</strong> do not use these numbers until a longer run converges.`}</li>
<li>Forecasts and scenarios say what would follow if the model and the scenario held; they are not predictions of what people or policies will do.</li>
<li>This report informs decisions; it does not replace local public-health authority and the judgement of trained epidemiologists.</li>
</ul>
</div>`,
  };
}
