import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts', 'packages/*/test/**/*.test.ts'],
    // the tests never read or fill the user's own parse cache
    env: { XDG_CACHE_HOME: mkdtempSync(join(tmpdir(), 'strata-test-cache-')) },
    testTimeout: 120_000,
    hookTimeout: 120_000,
    pool: 'forks',
    // tests build git repositories in temporary directories; two workers suit two cores
    maxWorkers: 2,
  },
});
