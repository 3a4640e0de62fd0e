#!/usr/bin/env node
// Part of the build (`npm run build`, after tsc): bundles the libraries the tool loads on every
// run into one file each under dist/vendor/, with esbuild:
//   stdlib-bundle.cjs  the @stdlib modules of src/util/vendor-bundles.ts (some 750 small files)
//   vega-bundle.mjs    vega's parse and View and vega-lite's compile (the report's charts)
//   arquero-bundle.mjs arquero's fromCSV (reading the case file and a run folder's tables)
// The bundles hold the packages' own code, unchanged; they only spare each process and each
// chain's worker thread from resolving and reading hundreds of files (measured: the @stdlib
// modules load in about 45 ms instead of 220 ms, the chart library in 130 ms instead of 310 ms,
// arquero's reader in 45 ms instead of 170 ms).
// The tool finds them next to its compiled modules and falls back to the packages when they
// are absent, so a build without esbuild (e.g. `npm ci --omit=dev`) still works, only slower.
import { existsSync, mkdirSync, renameSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const VENDOR = join(ROOT, 'dist', 'vendor');
const LISTS = join(ROOT, 'dist', 'util', 'vendor-bundles.js');

function note(message) {
  console.error(`bundle-vendor: ${message}`);
}

/** Removes `file` and says why, so the tool falls back to the packages rather than a stale bundle. */
function drop(file, why) {
  rmSync(file, { force: true });
  note(`${why}; ${file} not written, the tool loads the packages instead (slower start)`);
}

async function main() {
  if (!existsSync(LISTS)) {
    note(`${LISTS} not found; run tsc first (npm run build does both)`);
    process.exitCode = 1;
    return;
  }
  const { STDLIB_MODULES, STDLIB_BUNDLE, VEGA_BUNDLE, ARQUERO_BUNDLE } = await import(pathToFileURL(LISTS).href);
  const targets = [
    {
      file: join(VENDOR, STDLIB_BUNDLE),
      format: 'cjs',
      contents: `module.exports = {\n${STDLIB_MODULES.map((id) => `  ${JSON.stringify(id)}: require(${JSON.stringify(id)}),`).join('\n')}\n};\n`,
    },
    {
      file: join(VENDOR, VEGA_BUNDLE),
      format: 'esm',
      contents: "export { parse, View } from 'vega';\nexport { compile } from 'vega-lite';\n",
    },
    {
      file: join(VENDOR, ARQUERO_BUNDLE),
      format: 'esm',
      contents: "export { fromCSV } from 'arquero';\n",
    },
  ];
  let esbuild;
  try {
    esbuild = await import('esbuild');
  } catch {
    for (const t of targets) drop(t.file, 'esbuild is not installed');
    return;
  }
  mkdirSync(VENDOR, { recursive: true });
  for (const t of targets) {
    const partial = `${t.file}.partial`;
    try {
      const result = await esbuild.build({
        stdin: { contents: t.contents, resolveDir: ROOT, sourcefile: `${t.file.slice(VENDOR.length + 1)} (entry)` },
        bundle: true,
        platform: 'node',
        format: t.format,
        target: 'node20',
        outfile: partial,
        // the packages' licence notices stay in the bundle
        legalComments: 'eof',
        logLevel: 'silent',
      });
      for (const w of result.warnings) note(`${t.file}: ${w.text}`);
      renameSync(partial, t.file);
    } catch (e) {
      rmSync(partial, { force: true });
      drop(t.file, `bundling failed (${e?.message ?? e})`);
    }
  }
}

await main();
