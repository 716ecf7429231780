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

/** A small history where what one model reads of another changes, and where it does not. */
function facetHistory(): Array<{ date: string; message: string; files: Record<string, string> }> {
  const head = 'datasource db {\n  provider = "postgresql"\n}\n\n';
  const enumKind = (values: string[]): string => `enum Kind {\n${values.map((v) => `  ${v}\n`).join('')}}\n\n`;
  const tool = (o: { idMap?: boolean; tableMap?: boolean; extra?: boolean; pad?: boolean }): string =>
    `model Tool {\n  id${o.pad ? '    ' : ''} Int @id${o.idMap ? ' @map("tool_id")' : ''}\n  label String\n  kind Kind\n${o.extra ? '  note String?\n' : ''}  loans Loan[]\n${o.tableMap ? '  @@map("tools")\n' : ''}}\n\n`;
  const loan = 'model Loan {\n  id Int @id\n  toolId Int\n  tool Tool @relation(fields: [toolId], references: [id])\n}\n';
  const steps = [
    head + enumKind(['DRILL', 'SAW']) + tool({}) + loan,
    head + enumKind(['DRILL', 'SAW']) + tool({ idMap: true }) + loan,
    head + enumKind(['DRILL', 'SAW']) + tool({ idMap: true, tableMap: true }) + loan,
    head + enumKind(['DRILL', 'SAW', 'LADDER']) + tool({ idMap: true, tableMap: true }) + loan,
    head + enumKind(['DRILL', 'SAW', 'LADDER']) + tool({ idMap: true, tableMap: true, extra: true }) + loan,
    head + enumKind(['DRILL', 'SAW', 'LADDER']) + tool({ idMap: true, tableMap: true, extra: true, pad: true }) + loan,
  ];
  return steps.map((text, i) => ({ date: `2024-0${i + 1}-01T10:00:00+00:00`, message: `step ${i}`, files: { 'prisma/schema.prisma': text } }));
}

describe('the Prisma session', () => {
  it('converts a model again when what it reads of another changes (a mapped key column, a table name, enum values), and only then', async () => {
    const repo = await makeRepo(tmp.dir, 'facets', facetHistory());
    const { adapter, reused } = counting();
    const withSession = await extractHistory({ repo, adapter });
    const { createSession: _s, ...stateless } = prisma;
    const without = await extractHistory({ repo, adapter: stateless as SchemaAdapter });
    const doc = (h: typeof without): string => serialiseDocument(toDocument(h, GENERATOR));
    expect(doc(withSession)).toBe(doc(without));
    // Loan's foreign key follows Tool's mapped key column (version 1) and table name (version 2)
    const loanChanges = withSession.changes.filter((c) => c.table === 'Loan').map((c) => [c.version, c.kind]);
    expect(loanChanges.map(([v]) => v)).toEqual(expect.arrayContaining([1, 2]));
    // taken over unchanged: Loan at versions 3, 4 and 5, Tool at version 5 (reformatted only)
    expect(reused()).toBe(4);
  });

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
