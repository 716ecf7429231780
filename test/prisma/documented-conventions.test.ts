/**
 * The adapter against Prisma's documentation of its conventions. Each expected value is taken
 * from the page named beside it; where a value comes from memory rather than from a page read
 * while writing this test, the comment says so. The schema-engine oracle
 * (schema-engine-oracle.test.ts) checks the same conventions against the engine itself.
 */
import { describe, expect, it } from 'vitest';
import { assemblePrisma } from '@schema-strata/adapter-prisma';
import type { SnapshotInput } from '@schema-strata/core';

function snapshot(text: string, provider = 'postgresql', joinKey = 'auto'): SnapshotInput {
  const r = assemblePrisma(
    { files: [{ path: 'schema.prisma', blob: '0', text: `datasource db {\n  provider = "${provider}"\n}\n\n${text}` }], missing: [] },
    { 'prisma-join-key': joinKey },
  );
  if ('failed' in r) throw new Error(JSON.stringify(r.diagnostics));
  return r.snapshot;
}
const table = (s: SnapshotInput, name: string) => s.tables.find((t) => t.name === name)!;

describe('implicit many-to-many relation tables (Prisma docs, "Many-to-many relations", section "Conventions for relation tables in implicit m-n relations")', () => {
  const s = snapshot(`model Tool {
  id         Int        @id
  categories Category[]
  @@map("tools")
}

model Category {
  id    Int    @id
  tools Tool[]
  @@map("z_categories")
}

model Member {
  id      Int    @id
  badges  Badge[] @relation("MemberBadges")
}

model Badge {
  id      Int      @id
  holders Member[] @relation("MemberBadges")
}`);

  it('the table is named _ + the relation name; the default relation name is the two model names in alphabetical order joined by "To"', () => {
    // docs: "_CategoryToPost" for models Category and Post; the table names (@@map) play no part
    expect(s.tables.map((t) => t.name)).toContain('_CategoryToTool');
    // docs: a relation named "MyRelation" gets the table "_MyRelation"
    expect(s.tables.map((t) => t.name)).toContain('_MemberBadges');
  });

  it('column A references the model first in alphabetical order, B the other, both cascading', () => {
    const j = table(s, '_CategoryToTool');
    expect(j.columns.map((c) => [c.name, c.nullable])).toEqual([['A', false], ['B', false]]);
    expect(j.foreignKeys.map((f) => [f.columns[0], f.referencedTable, f.onDelete, f.onUpdate])).toEqual([
      ['A', 'z_categories', 'cascade', 'cascade'],
      ['B', 'tools', 'cascade', 'cascade'],
    ]);
    expect(table(s, '_MemberBadges').foreignKeys.map((f) => f.referencedTable)).toEqual(['Badge', 'Member']);
  });

  it('the key: a primary key (A, B) on PostgreSQL since Prisma 6 (docs, "Upgrade to Prisma ORM 6"), a unique index before, and on other databases', () => {
    expect(table(s, '_CategoryToTool').primaryKey).toEqual(['A', 'B']);
    expect(table(s, '_CategoryToTool').uniques).toEqual([]);
    const old = snapshot('model Tool {\n  id Int @id\n  tags Tag[]\n}\n\nmodel Tag {\n  id Int @id\n  tools Tool[]\n}', 'postgresql', 'unique');
    expect(table(old, '_TagToTool').primaryKey).toEqual([]);
    expect(table(old, '_TagToTool').uniques).toEqual([{ columns: ['A', 'B'] }]);
    for (const provider of ['mysql', 'sqlite', 'sqlserver', 'cockroachdb']) {
      const t = table(snapshot('model Tool {\n  id BigInt @id\n  tags Tag[]\n}\n\nmodel Tag {\n  id BigInt @id\n  tools Tool[]\n}', provider), '_TagToTool');
      expect({ provider, pk: t.primaryKey, uniques: t.uniques }).toEqual({ provider, pk: [], uniques: [{ columns: ['A', 'B'] }] });
    }
  });
});

describe('referential action defaults (Prisma docs, "Referential actions", section "Referential action defaults")', () => {
  // The page's table: onDelete SetNull for optional relations, Restrict for mandatory ones;
  // onUpdate Cascade for both. (Before Prisma 2.26 the database got ON DELETE CASCADE, per the
  // same page's upgrade warning; the snapshot follows the current engine, not that.)
  const s = snapshot(`model Member {
  id    Int    @id
  loans Loan[] @relation("borrower")
  held  Loan[] @relation("holder")
}

model Loan {
  id         Int     @id
  borrowerId Int
  holderId   Int?
  borrower   Member  @relation("borrower", fields: [borrowerId], references: [id])
  holder     Member? @relation("holder", fields: [holderId], references: [id])
}`);
  it('mandatory relation: onDelete restrict, onUpdate cascade', () => {
    const fk = table(s, 'Loan').foreignKeys.find((f) => f.columns[0] === 'borrowerId')!;
    expect([fk.onDelete, fk.onUpdate]).toEqual(['restrict', 'cascade']);
  });
  it('optional relation: onDelete set null, onUpdate cascade', () => {
    const fk = table(s, 'Loan').foreignKeys.find((f) => f.columns[0] === 'holderId')!;
    expect([fk.onDelete, fk.onUpdate]).toEqual(['set null', 'cascade']);
  });
  it('SQL Server, which has no Restrict, gets NoAction for mandatory relations (same page, support table; prisma-engines psl, default_on_delete_action); emulated relations keep Restrict', () => {
    // the wasm schema engine has no SQL Server connector, so this rests on the documentation and the engine's source
    const loans = `model Member {\n  id    Int    @id\n  loans Loan[]\n}\n\nmodel Loan {\n  id       Int    @id\n  memberId Int\n  member   Member @relation(fields: [memberId], references: [id])\n}`;
    const fk = (provider: string, extra = '') => {
      const r = assemblePrisma(
        { files: [{ path: 'schema.prisma', blob: '0', text: `datasource db {\n  provider = "${provider}"\n${extra}}\n\n${loans}` }], missing: [] },
        {},
      );
      if ('failed' in r) throw new Error(JSON.stringify(r.diagnostics));
      const f = r.snapshot.tables.find((t) => t.name === 'Loan')!.foreignKeys[0]!;
      return [f.onDelete, f.onUpdate];
    };
    expect(fk('sqlserver')).toEqual(['no action', 'cascade']);
    expect(fk('sqlserver', '  relationMode = "prisma"\n')).toEqual(['restrict', 'cascade']);
    expect(fk('mysql')).toEqual(['restrict', 'cascade']);
  });
});
