import { describe, expect, it } from 'vitest';
import { compareWithOracle, compile, load, oracleTables, typeormMetadata } from './oracle.js';
import { readFixture, runAdapter } from './harness.js';

// The oracle is TypeORM 0.3's own metadata builder (test/package.json pins the version): the
// fixture sources are compiled by TypeScript with decorator metadata, loaded, and TypeORM
// derives the tables; the adapter reads the same sources as text.
const corpus = readFixture('corpus');

describe('the fixture corpus against TypeORM', () => {
  for (const naming of ['default', 'snake'] as const) {
    it(`gives TypeORM's tables, columns, types, keys and join tables (${naming} naming)`, async () => {
      const o = { strict: true, baseUrl: '.', paths: { '@coop/*': ['src/*'] }, ...(naming === 'snake' ? { naming } : {}) };
      const ds = await typeormMetadata(load(compile(corpus, o), o), o);
      const theirs = oracleTables(ds);
      const ours = await runAdapter(corpus, { 'typeorm-naming': naming });
      expect(ours.snapshot).toBeDefined();
      expect(compareWithOracle(ours.snapshot!, theirs, ds)).toEqual([]);
      expect(theirs.tables.length).toBeGreaterThan(30);
      expect(ours.snapshot!.views?.map((v) => v.name).sort()).toEqual([...theirs.views].sort());
    });
  }
});
