/**
 * Oracle: Prisma's own schema engine (@prisma/schema-engine-wasm, the engine version the adapter
 * ships) renders the SQL that creates each fixture schema from an empty database; that SQL runs
 * in PGlite (PostgreSQL in WebAssembly); the database's catalogs (information_schema and
 * pg_catalog) are read back and compared with the adapter's snapshot of the same schema: tables,
 * columns (order, type, nullability, default), primary keys, unique constraints and foreign keys
 * with their referenced columns and ON DELETE / ON UPDATE rules.
 *
 * Fixtures (test/fixtures/prisma/oracle/, tool-lending co-op scenario):
 * - relations.prisma: @@map/@map, composite @@id, composite foreign keys (2 and 3 columns),
 *   onDelete/onUpdate explicit and default (required and optional relations), one-to-one,
 *   one-to-many self-relation, implicit m-n with the default name, an explicitly named m-n, a
 *   self m-n, an m-n between models whose table names sort opposite to their model names, an
 *   m-n with a lower-case model name, enums with @@map and @map on values (and a default on a
 *   mapped value), @unique/@@unique (named with map:), scalar lists, @updatedAt, a named FK.
 * - types.prisma: native types (@db.*), Decimal/Float/DateTime defaults, scalar lists with a
 *   default, lists of enums, Unsupported(...) fields, an @ignore field, an @@ignore model,
 *   client-side defaults (uuid(), cuid()), dbgenerated(...), a view (no SQL, not a table).
 * - multi-schema.prisma: multiSchema namespaces (public normalised away), an enum in a schema,
 *   foreign keys across schemas, m-n join tables placed in the first model's schema.
 * - relation-mode.prisma: relationMode = "prisma": no foreign-key constraints in the SQL; the
 *   adapter marks its FKs enforcement 'orm', and they equal the constraints the engine renders
 *   for the same schema in foreignKeys mode.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { PGlite } from '@electric-sql/pglite';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { SnapshotInput } from '@schema-strata/core';
import { assemblePrisma, modernise, parseWithEngine } from '@schema-strata/adapter-prisma';
import { renderCreateSql } from './support/schema-engine.js';
import { introspect, type DbSchema } from './support/pg-catalog.js';
import { fromDatabase, fromSnapshot } from './support/compare.js';
import { fromSqlite, sqliteWith } from './support/sqlite-catalog.js';

const FIXTURES = join(import.meta.dirname, '..', 'fixtures', 'prisma', 'oracle');
const fixture = (name: string): string => readFileSync(join(FIXTURES, name), 'utf8');

function adapterSnapshot(path: string, text: string, joinKey = 'auto'): { snapshot: SnapshotInput; diagnostics: unknown[] } {
  const r = assemblePrisma({ files: [{ path, blob: '0', text }], missing: [] }, { 'prisma-join-key': joinKey });
  if ('failed' in r) throw new Error(`adapter failed: ${JSON.stringify(r.diagnostics)}`);
  return r;
}

/** Prisma enum value -> database name, from the engine's data model (for defaults on mapped enum values). */
function enumDbNames(text: string): Map<string, string> {
  const parsed = parseWithEngine([{ path: 'schema.prisma', text: modernise(text).text }]);
  if (!parsed.ok) throw new Error('fixture does not parse');
  const out = new Map<string, string>();
  for (const e of parsed.datamodel.enums) for (const v of e.values) out.set(v.name, v.dbName ?? v.name);
  return out;
}

interface Rendered {
  sql: string;
  db: PGlite;
  schema: DbSchema;
}

const renders = new Map<string, Promise<Rendered>>();
/** Render a schema's SQL, run it in a new PGlite database and introspect it (once per text; the database is only read). */
function renderAndLoad(text: string): Promise<Rendered> {
  let r = renders.get(text);
  if (!r) {
    r = (async () => {
      const sql = await renderCreateSql(modernise(text).text);
      const db = new PGlite();
      await db.exec(sql);
      return { sql, db, schema: await introspect(db) };
    })();
    renders.set(text, r);
  }
  return r;
}

afterAll(async () => {
  for (const r of renders.values()) await (await r).db.close();
});

describe.each(['relations.prisma', 'types.prisma', 'multi-schema.prisma'])('schema engine oracle: %s', (name) => {
  const text = fixture(name);
  let rendered: Rendered;
  let snapshot: SnapshotInput;
  beforeAll(async () => {
    rendered = await renderAndLoad(text);
    snapshot = adapterSnapshot(`prisma/${name}`, text).snapshot;
  });

  it('has the same tables, columns, keys, uniques and foreign keys as the database the engine creates', async () => {
    const fromDb = await fromDatabase(rendered.db, rendered.schema);
    const fromAdapter = await fromSnapshot(rendered.db, snapshot, enumDbNames(text));
    expect(Object.keys(fromAdapter)).toEqual(Object.keys(fromDb));
    for (const id of Object.keys(fromDb)) expect({ id, ...fromAdapter[id] }).toEqual({ id, ...fromDb[id] });
  });

  it('names foreign keys as the database does where the schema names them (map:)', () => {
    for (const t of snapshot.tables) {
      for (const fk of t.foreignKeys) {
        if (!fk.name) continue;
        const dbt = rendered.schema.tables.get(t.namespace ? `${t.namespace}.${t.name}` : t.name)!;
        expect(dbt.foreignKeys.find((d) => d.columns.join() === fk.columns.join())?.name).toBe(fk.name);
      }
    }
  });

  it('marks every foreign key as enforced by the database', () => {
    for (const t of snapshot.tables) for (const fk of t.foreignKeys) expect(fk.enforcement).toBe('database');
  });
});

describe('schema engine oracle: constructs with no table of their own', () => {
  it('a view renders no SQL and is a view of the snapshot, not a table', async () => {
    const text = fixture('types.prisma');
    const { sql, db, schema } = await renderAndLoad(text);
    const snap = adapterSnapshot('prisma/types.prisma', text).snapshot;
    expect(sql).not.toMatch(/ToolSummary/);
    expect([...schema.tables.keys()]).not.toContain('ToolSummary');
    expect(schema.views).toEqual([]);
    expect(snap.tables.map((t) => t.name)).not.toContain('ToolSummary');
    expect(snap.views?.map((v) => v.name)).toEqual(['ToolSummary']);
  });

  it('@@ignore models and @ignore fields are still created by the engine, and kept by the adapter', async () => {
    const text = fixture('types.prisma');
    const { db, schema } = await renderAndLoad(text);
    expect(schema.tables.has('archived_tools')).toBe(true);
    expect(schema.tables.get('Inventory')!.columns.map((c) => c.name)).toContain('legacy_code');
    const snap = adapterSnapshot('prisma/types.prisma', text).snapshot;
    expect(snap.tables.find((t) => t.name === 'archived_tools')?.columns.map((c) => c.name)).toEqual(['id', 'name', 'old_code']);
  });
});

describe('schema engine oracle: relationMode = "prisma"', () => {
  const text = fixture('relation-mode.prisma');
  const asForeignKeys = text.replace(/relationMode\s*=\s*"prisma"/, '');

  it('the engine renders no foreign-key constraint; the adapter keeps the relations, marked orm', async () => {
    const { sql, db, schema } = await renderAndLoad(text);
    expect(sql).not.toMatch(/FOREIGN KEY/);
    for (const t of schema.tables.values()) expect(t.foreignKeys).toEqual([]);
    const snap = adapterSnapshot('prisma/relation-mode.prisma', text).snapshot;
    const fks = snap.tables.flatMap((t) => t.foreignKeys);
    expect(fks.length).toBe(4); // Reservation.member, Reservation.tool, and the two of _MemberToTool
    for (const fk of fks) expect(fk.enforcement).toBe('orm');
    // tables, columns, keys and uniques (no FKs) equal the database's
    const fromDb = await fromDatabase(db, schema);
    const fromAdapter = await fromSnapshot(db, snap, new Map(), { withForeignKeys: false });
    expect(fromAdapter).toEqual(fromDb);
  });

  it("the adapter's orm-enforced FKs equal the constraints the engine renders in foreignKeys mode", async () => {
    const { db, schema } = await renderAndLoad(asForeignKeys);
    expect(schema.tables.get('Reservation')!.foreignKeys.length).toBe(2);
    const fromDb = await fromDatabase(db, schema);
    const fromAdapter = await fromSnapshot(db, adapterSnapshot('prisma/relation-mode.prisma', text).snapshot, new Map());
    expect(fromAdapter).toEqual(fromDb);
  });
});

/**
 * The key of implicit m-n join tables per provider. The engine renders a primary key (A, B) on
 * PostgreSQL (Prisma 6 and later; Prisma docs, "Upgrade to Prisma ORM 6", schema change for
 * implicit m-n relations on PostgreSQL: it applies to PostgreSQL only, CockroachDB keeps the
 * unique index) and a unique index `_..._AB_unique` elsewhere. The wasm engine has no MySQL or
 * SQL Server connector, so those two follow the documentation only.
 */
describe.each([
  { provider: 'postgresql', id: 'Int', key: 'primary-key' },
  { provider: 'cockroachdb', id: 'BigInt', key: 'unique' },
  { provider: 'sqlite', id: 'Int', key: 'unique' },
])('schema engine oracle: implicit m-n join-table key on $provider', ({ provider, id, key }) => {
  const text = `datasource db {
  provider = "${provider}"
}

model Tool {
  id   ${id}   @id
  tags Tag[]
}

model Tag {
  id    ${id}    @id
  tools Tool[]
}
`;
  it(`the engine renders a ${key}, and so does the adapter (auto)`, async () => {
    const sql = await renderCreateSql(text);
    const pk = /CONSTRAINT "_TagToTool_AB_pkey" PRIMARY KEY \("A","B"\)/.test(sql);
    const unique = /CREATE UNIQUE INDEX "_TagToTool_AB_unique" ON "_TagToTool"\("A", "B"\)/.test(sql);
    expect({ pk, unique }).toEqual({ pk: key === 'primary-key', unique: key === 'unique' });
    const join = adapterSnapshot('schema.prisma', text).snapshot.tables.find((t) => t.name === '_TagToTool')!;
    expect(join.primaryKey).toEqual(key === 'primary-key' ? ['A', 'B'] : []);
    expect(join.uniques).toEqual(key === 'unique' ? [{ columns: ['A', 'B'] }] : []);
  });
});

/**
 * The same oracle on SQLite: the engine renders the SQLite SQL of sqlite.prisma, sql.js (SQLite
 * in WebAssembly) runs it, and SQLite's PRAGMAs are compared with the adapter's snapshot: default
 * type mappings of every Prisma scalar, keys, unique indexes, foreign keys and their actions,
 * defaults, and the implicit m-n join table (a unique index (A, B) on SQLite, no primary key).
 */
describe('schema engine oracle on SQLite: sqlite.prisma', () => {
  it('has the same tables, columns, keys, uniques and foreign keys as the database the engine creates', async () => {
    const text = fixture('sqlite.prisma');
    const sql = await renderCreateSql(modernise(text).text);
    const db = await sqliteWith(sql);
    try {
      const fromDb = fromSqlite(db);
      const fromAdapter = await fromSnapshot(null, adapterSnapshot('prisma/sqlite.prisma', text).snapshot, new Map());
      expect(Object.keys(fromAdapter)).toEqual(Object.keys(fromDb));
      for (const id of Object.keys(fromDb)) expect({ id, ...fromAdapter[id] }).toEqual({ id, ...fromDb[id] });
      expect(fromDb._MemberToSkill!.uniques).toEqual(['A,B']);
    } finally {
      db.close();
    }
  });
});
