#!/usr/bin/env node
// Entry point of the command-line tool; the compiled program lives in dist/.
import('../dist/cli/main.js').then((m) => m.main(process.argv)).catch((e) => {
  console.error(`waxwane: could not start (${e && e.message ? e.message : e}); run "npm run build" first`);
  process.exit(1);
});
