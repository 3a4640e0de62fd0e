#!/usr/bin/env node
// Regenerates data-demo/ from the scenario files beside it, with the seeds recorded here.
// `waxwane simulate` is deterministic: the same scenario and seed give the same bytes.
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

export const DEMO_DATA = [
  { scenario: 'data-demo/scenarios/larkmere.json', out: 'data-demo/larkmere', seed: 20310203 },
  { scenario: 'data-demo/scenarios/districts.json', out: 'data-demo/districts', seed: 20310303 },
];

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
if (process.argv[1] === fileURLToPath(import.meta.url)) {
  for (const d of DEMO_DATA) {
    const r = spawnSync(
      process.execPath,
      [join(root, 'bin', 'waxwane.js'), 'simulate', d.scenario, '--out', d.out, '--seed', String(d.seed), '--force'],
      { cwd: root, stdio: 'inherit' },
    );
    if (r.status !== 0) process.exit(r.status ?? 1);
  }
}
