// The co-op corpus against Knex itself on PostgreSQL (PGlite, PostgreSQL compiled to
// WebAssembly): the migrations of the last commit run one by one through Knex's PostgreSQL
// client, and after each the database (information_schema and pg_catalog) is compared with the
// adapter's replay for the postgresql dialect: the structure as on SQLite, and also the column
// types (lengths, precision and scale, time zones, enum values, json/jsonb, serial columns),
// which SQLite cannot show.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PGlite } from '@electric-sql/pglite';
import type { NeutralType } from '@schema-strata/core';
import { loadFixture, replaySteps, tablesOf } from './fixture.js';
import { resetPg, runKnex, type OracleRun } from './oracle.js';
import { fromDatabase, fromReplay, neutralOfPg, pgDefault, type Ignore } from './compare.js';

const OPTIONS = { 'knex-init': ['db/base-schema.js'], 'knex-environment': 'production' };
const RAW_DDL: Ignore[] = [{ table: 'tools', column: 'legacy_code' }];

let pg: PGlite;
let oracle: OracleRun;
let steps: Awaited<ReturnType<typeof replaySteps>>;

beforeAll(async () => {
  pg = await PGlite.create();
  const h = loadFixture('coop');
  const tree = h.trees[h.trees.length - 1]!;
  await resetPg(pg);
  oracle = await runKnex(tree, { engine: 'pglite', pglite: pg, environment: 'production', init: ['db/base-schema.js'], each: true });
  steps = (await replaySteps(tree, OPTIONS)).filter((s) => s.role === 'migration');
});

afterAll(async () => {
  await pg?.close();
});

/** A neutral type without absent fields, for comparison. */
const clean = (t: NeutralType): unknown => JSON.parse(JSON.stringify(t));

describe('co-op corpus on PostgreSQL (oracle: Knex 3 with its PostgreSQL client on PGlite)', () => {
  it('runs the same migrations in the same order', () => {
    expect(steps.map((s) => s.path.slice(s.path.lastIndexOf('/') + 1))).toEqual(oracle.migrations);
    expect(oracle.migrations.length).toBeGreaterThanOrEqual(40);
  });

  it('agrees with PostgreSQL on tables, columns, nullability, defaults, keys and uniques after every migration', () => {
    let raw = false;
    steps.forEach((s, i) => {
      raw ||= oracle.migrations[i] === '20250203_raw_ddl.js';
      const ignore = raw ? RAW_DDL : [];
      expect(fromReplay(tablesOf(s.snapshot), 'pg', ignore), `after ${oracle.migrations[i]}`).toEqual(fromDatabase(oracle.after[i]!.tables, 'pg', ignore));
    });
  });

  it('agrees with PostgreSQL on every column type after every migration', () => {
    let checked = 0;
    steps.forEach((s, i) => {
      const db = oracle.after[i]!.tables;
      for (const t of tablesOf(s.snapshot)) {
        const dt = db.find((x) => x.name === t.name && (x.schema ?? undefined) === t.namespace)!;
        for (const c of t.columns) {
          const where = `${t.name}.${c.name} after ${oracle.migrations[i]}`;
          expect(clean(c.type), where).toEqual(clean(neutralOfPg(dt, c.name)));
          // serial columns: the replay's `generated` flag is PostgreSQL's sequence default
          const dc = dt.columns.find((x) => x.name === c.name)!;
          expect(c.generated === 'autoincrement', where).toBe(/^nextval\(/.test(dc.default ?? ''));
          checked++;
        }
      }
    });
    expect(checked).toBeGreaterThan(1000);
  });

  it('reads column comments as PostgreSQL keeps them, without letting them change the schema', () => {
    const tools = oracle.after[oracle.after.length - 1]!.tables.find((t) => t.name === 'tools')!;
    expect(tools.columns.find((c) => c.name === 'max_days')!.pg!.comment).toBe('longest loan in days');
    const replayed = tablesOf(steps[steps.length - 1]!.snapshot).find((t) => t.name === 'tools')!;
    expect(replayed.columns.find((c) => c.name === 'max_days')).toMatchObject({ nativeType: 'integer unsigned', default: '14', nullable: false });
    expect(pgDefault(tools.columns.find((c) => c.name === 'max_days')!.default)).toBe('14');
  });
});
