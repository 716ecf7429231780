#!/bin/sh
# The whole test suite on a fresh machine: system packages the tests need, the build, the tests.
# Run from the repository root (the README's test command calls it through `pnpm test`).
set -eu
cd "$(dirname "$0")/.."
sh scripts/ensure-system-deps.sh
tsc -b packages/core packages/adapter-prisma packages/adapter-typeorm packages/adapter-knex
vitest run "$@"
