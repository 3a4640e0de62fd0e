// Preloaded into a timed `waxwane fit` process (`node --import <this file> bin/waxwane.js fit ...`):
// on exit it writes the process's own resource usage (peak resident memory, CPU time of every
// thread) as JSON to the file named by WAXWANE_BENCH_USAGE. It changes nothing else.
import { writeFileSync } from 'node:fs';

const target = process.env.WAXWANE_BENCH_USAGE;
if (target) {
  process.on('exit', (code) => {
    const u = process.resourceUsage();
    writeFileSync(
      target,
      JSON.stringify({ exitCode: code, maxRssKB: u.maxRSS, userCpuSeconds: u.userCPUTime / 1e6, systemCpuSeconds: u.systemCPUTime / 1e6 }),
    );
  });
}
