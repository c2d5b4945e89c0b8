#!/usr/bin/env node
// Entry point for `npx tailmark`: the compiled CLI lives in dist/ (built by `npm run prepare`, which npm ci runs).
import { main } from '../dist/src/cli/main.js';

main(process.argv.slice(2)).then(
  (code) => { process.exitCode = code; },
  (err) => { process.stderr.write(`tailmark: ${err instanceof Error ? err.message : String(err)}\n`); process.exitCode = 1; },
);
