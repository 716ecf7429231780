// The Prisma adapter's session (which takes unchanged models over from the previous version,
// the very table objects with the origins of then) against the adapter without a session (every
// version converted anew), on seeded synthetic histories: the interchange files must be the same
// bytes. The histories add, drop and retype columns in the middle of the schema (so that the
// lines of later models move), relate and drop models, reformat the whole schema and revert.
import { afterAll, describe, expect, it } from 'vitest';
import { extractHistory, serialiseDocument, toDocument, GENERATOR, type AssembleResult, type SchemaAdapter } from '@schema-strata/core';
import prisma from '@schema-strata/adapter-prisma';
import { prismaHistoryCommits } from '../../bench/lib/prisma-history.js';
import { makeRepo, tempDir } from '../helpers/repo.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

/** The adapter with its session wrapped to count the tables handed over unchanged (same object as in the version before). */
function counting(): { adapter: SchemaAdapter; reused: () => number } {
  let reused = 0;
  const adapter: SchemaAdapter = {
    ...prisma,
    createSession(options) {
      const inner = prisma.createSession!(options);
      let before = new Set<object>();
      return {
        async assemble(input) {
          const r: AssembleResult = await inner.assemble(input);
          if (!('failed' in r)) {
            for (const t of r.snapshot.tables) if (before.has(t)) reused++;
            before = new Set(r.snapshot.tables);
          }
          return r;
        },
      };
    },
  };
  return { adapter, reused: () => reused };
}

describe('the Prisma session', () => {
  for (const seed of [3, 11]) {
    it(`gives the bytes of a run without a session (seed ${seed})`, async () => {
      const { commits } = prismaHistoryCommits({ commits: 140, models: 24, seed });
      const repo = await makeRepo(tmp.dir, `seed-${seed}`, commits);
      const { adapter, reused } = counting();
      const withSession = await extractHistory({ repo, adapter });
      const { createSession: _s, ...stateless } = prisma;
      const without = await extractHistory({ repo, adapter: stateless as SchemaAdapter });
      expect(withSession.versions.length).toBeGreaterThan(50);
      // the path under test was taken: most tables of most versions came over unchanged
      expect(reused()).toBeGreaterThan(withSession.versions.length * 5);
      const doc = (h: typeof without): string => serialiseDocument(toDocument(h, GENERATOR));
      expect(doc(withSession)).toBe(doc(without));
    }, 120_000);
  }
});
