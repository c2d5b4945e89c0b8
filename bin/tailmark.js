#!/usr/bin/env node
// Entry point for `npx tailmark`: the compiled CLI lives in dist/ (built by `npm run prepare`, which npm ci runs).
import { main } from '../dist/src/cli/main.js';

// A closed pipe (e.g. `tailmark score ... --json | head`) is not an error of ours: stop quietly.
process.stdout.on('error', (err) => {
  if (err && err.code === 'EPIPE') process.exit(0);
  throw err;
});

main(process.argv.slice(2)).then(
  (code) => { process.exitCode = code; },
  (err) => { process.stderr.write(`tailmark: ${err instanceof Error ? err.message : String(err)}\n`); process.exitCode = 1; },
);
