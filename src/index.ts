// Public API: re-exports only.
export { WaxwaneError } from './errors.js';
export type { PriorSet, ModelSettings, PriorSpecs } from './model/prior-set.js';
export { createRng, restoreRng, deriveSeed } from './util/rng.js';
