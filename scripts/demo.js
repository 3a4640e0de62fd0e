#!/usr/bin/env node
// `npm run demo`: fits the bundled demo place (data-demo/larkmere, an invented town simulated by
// `waxwane simulate`), forecasts 28 days under two scenarios with a nowcast, and writes the
// outputs under demo-output/larkmere/.
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const bin = join(root, 'bin', 'waxwane.js');

function waxwane(args) {
  console.error(`\n$ waxwane ${args.join(' ')}`);
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: root, stdio: 'inherit' });
  if (r.status !== 0) {
    console.error(`demo step failed with exit code ${r.status}`);
    process.exit(r.status ?? 1);
  }
}

waxwane([
  'fit', 'data-demo/larkmere/cases.csv',
  '--population', '320000',
  '--out', 'demo-output/larkmere',
  '--seed', '7',
  '--force',
]);
// a 28-day forecast from the saved draws (no refit): the walk carried on against a measure that
// cuts transmission by 30% for three weeks, and the nowcast of the reports still to come
waxwane([
  'forecast', 'demo-output/larkmere',
  '--horizon', '28',
  '--scenarios', 'data-demo/scenarios/larkmere-measures.json',
  '--force',
]);
console.error(
  '\nDemo outputs: demo-output/larkmere/ (summary.csv, diagnostics.csv, draws.csv, data.csv, run.json;' +
    ' forecast.csv, scenarios.csv, nowcast.csv, growth.csv, forecast.json; report.html)',
);
