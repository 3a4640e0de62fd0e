/**
 * arquero's CSV reader, the one part of arquero the project uses (io/cases.ts, the report's
 * table reader): from the one-file bundle the build writes (scripts/bundle-vendor.mjs,
 * dist/vendor/arquero-bundle.mjs: arquero's own code, loaded in about a quarter of the time of
 * the package's modules, on every run's start), else from the package (running from src/ in
 * the tests, or a build without the bundler).
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { ARQUERO_BUNDLE } from './vendor-bundles.js';

type FromCsv = typeof import('arquero').fromCSV;

async function load(): Promise<{ fromCSV: FromCsv; bundled: boolean }> {
  const bundle = new URL(`../vendor/${ARQUERO_BUNDLE}`, import.meta.url);
  if (existsSync(fileURLToPath(bundle))) return { fromCSV: ((await import(bundle.href)) as { fromCSV: FromCsv }).fromCSV, bundled: true };
  return { fromCSV: (await import('arquero')).fromCSV, bundled: false };
}

const loaded = await load();

/** arquero's `fromCSV`. */
export const fromCSV: FromCsv = loaded.fromCSV;

/** Whether it came from the bundle (else from the package). */
export const ARQUERO_BUNDLED = loaded.bundled;
