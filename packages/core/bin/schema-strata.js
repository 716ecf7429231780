#!/usr/bin/env node
import { main } from '../dist/cli/main.js';

main(process.argv.slice(2)).then(
  (code) => { process.exitCode = code; },
  (err) => {
    process.stderr.write(`schema-strata: internal error: ${err && err.message ? err.message : err}\n`);
    process.exitCode = 70;
  },
);
