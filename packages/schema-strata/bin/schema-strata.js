#!/usr/bin/env node
// The schema-strata CLI with the adapters this package depends on: they are resolved from this
// package's own place, whatever the package manager's layout (hoisted, isolated, global).
import { main, registerAdapterBase } from '@schema-strata/core';

registerAdapterBase(import.meta.url);
main(process.argv.slice(2)).then(
  (code) => { process.exitCode = code; },
  (err) => {
    process.stderr.write(`schema-strata: internal error: ${err && err.message ? err.message : err}\n`);
    process.exitCode = 70;
  },
);
