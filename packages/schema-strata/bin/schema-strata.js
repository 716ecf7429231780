#!/usr/bin/env node
// The schema-strata CLI with the adapters this package depends on: they are resolved from this
// package's own place, whatever the package manager's layout (hoisted, isolated, global).
import { registerAdapterBase } from '@schema-strata/core/extract';
import { runAsProcess } from '@schema-strata/core/cli';

registerAdapterBase(import.meta.url);
runAsProcess();
