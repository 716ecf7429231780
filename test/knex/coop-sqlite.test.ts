// The co-op corpus against Knex itself on SQLite: every commit of the fixture history is
// replayed by the adapter (through core's extract) and run for real by Knex (better-sqlite3),
// and the two schemas are compared: tables, columns in order, nullability, defaults, primary
// keys, foreign keys and unique constraints. Types are not compared here (SQLite keeps the
// declared type text only); see coop-pglite.test.ts.
import { beforeAll, describe, expect, it } from 'vitest';
import { extractHistory, snapshotOfVersion, toDocument, type InterchangeDocument } from '@schema-strata/core';
import knexAdapter from '@schema-strata/adapter-knex';
import { fixtureRepository, replaySteps, tablesOf, type FixtureHistory } from './fixture.js';
import { KnexProject, runKnex } from './oracle.js';
import { fromDatabase, fromReplay, type Ignore } from './compare.js';

const OPTIONS = { 'knex-init': ['db/base-schema.js'], 'knex-environment': 'development' };
/** The raw DDL migration adds this column behind the replay's back (the adapter does not read SQL). */
const RAW_DDL: Ignore[] = [{ table: 'tools', column: 'legacy_code' }];
const RAW_DDL_MIGRATION = '20250203_raw_ddl.js';

let history: FixtureHistory;
let commitIds: string[];
let doc: InterchangeDocument;

beforeAll(async () => {
  const repo = await fixtureRepository('coop');
  history = repo.history;
  commitIds = repo.commitIds;
  const h = await extractHistory({ repo: repo.dir, adapter: knexAdapter, adapterOptions: OPTIONS });
  doc = toDocument(h, { name: 'test', version: '0' });
});

describe('co-op corpus on SQLite (oracle: Knex 3 running the migrations on better-sqlite3)', () => {
  it('has at least 40 migrations in both JavaScript and TypeScript, CommonJS and ESM, over at least 25 commits', () => {
    const last = history.trees[history.trees.length - 1]!;
    const migrations = [...last.keys()].filter((p) => /^db\/(migrations|reporting)\//.test(p));
    expect(migrations.length).toBeGreaterThanOrEqual(40);
    expect(new Set(migrations.map((p) => p.slice(p.lastIndexOf('.'))))).toEqual(new Set(['.js', '.ts', '.mjs', '.cjs']));
    expect(migrations.some((p) => /exports\.up|module\.exports/.test(last.get(p)!))).toBe(true);
    expect(migrations.some((p) => /export (async )?(function|const) up/.test(last.get(p)!))).toBe(true);
    expect(history.commits.length).toBeGreaterThanOrEqual(25);
  });

  it('makes a version at every commit of the history', () => {
    expect(doc.versions.map((v) => v.commit)).toEqual(commitIds);
  });

  it('agrees with Knex on SQLite after every commit', async () => {
    // a commit that only adds files goes on with the same database, as `knex migrate:latest` would;
    // any other commit (an edited migration, knexfile or setup file) starts a new database
    const opts = { engine: 'sqlite' as const, environment: 'development', init: ['db/base-schema.js'] };
    let project: KnexProject | null = null;
    let fresh = 0;
    try {
      for (let i = 0; i < history.trees.length; i++) {
        const tree = history.trees[i]!;
        const prev = i > 0 ? history.trees[i - 1]! : null;
        const added = [...tree].filter(([p]) => !prev?.has(p));
        const onlyAdds = prev !== null && [...prev].every(([p, t]) => tree.get(p) === t);
        let inOrder = onlyAdds && project !== null;
        if (inOrder) {
          project!.add(added);
          const last = project!.ran[project!.ran.length - 1] ?? '';
          inOrder = (await project!.pending()).every((m) => m > last);
        }
        if (!inOrder) {
          await project?.close();
          project = await KnexProject.open(tree, opts);
          fresh++;
        }
        const oracle = await project!.migrate();
        const v = doc.versions.find((x) => x.commit === commitIds[i])!;
        const replay = tablesOf(snapshotOfVersion(doc, v.index)!);
        const ignore = project!.ran.includes(RAW_DDL_MIGRATION) ? RAW_DDL : [];
        expect(fromReplay(replay, 'sqlite', ignore), `commit ${i}: ${history.commits[i]!.message}`).toEqual(fromDatabase(oracle.final, 'sqlite', ignore));
      }
    } finally {
      await project?.close();
    }
    // the edited migration, the knexfile edits and the setup file edit each started a new database
    expect(fresh).toBeGreaterThanOrEqual(5);
  });

  it('agrees with Knex after every migration of the last commit, in the order Knex runs them', async () => {
    const tree = history.trees[history.trees.length - 1]!;
    const oracle = await runKnex(tree, { engine: 'sqlite', environment: 'development', init: ['db/base-schema.js'], each: true });
    const steps = (await replaySteps(tree, OPTIONS)).filter((s) => s.role === 'migration');
    expect(steps.map((s) => s.path.slice(s.path.lastIndexOf('/') + 1))).toEqual(oracle.migrations);
    let rawSeen = false;
    steps.forEach((s, i) => {
      rawSeen ||= oracle.migrations[i] === RAW_DDL_MIGRATION;
      const ignore = rawSeen ? RAW_DDL : [];
      expect(fromReplay(tablesOf(s.snapshot), 'sqlite', ignore), `after ${oracle.migrations[i]}`).toEqual(fromDatabase(oracle.after[i]!.tables, 'sqlite', ignore));
    });
  });

  it('leaves raw DDL out with a diagnostic at its place and counts raw statements', async () => {
    const tree = history.trees[history.trees.length - 1]!;
    const oracle = await runKnex(tree, { engine: 'sqlite', environment: 'development', init: ['db/base-schema.js'] });
    // the database got the column from the raw statement; the replay did not
    expect(oracle.final.find((t) => t.name === 'tools')!.columns.map((c) => c.name)).toContain('legacy_code');
    const last = doc.versions[doc.versions.length - 1]!;
    const replay = tablesOf(snapshotOfVersion(doc, last.index)!);
    expect(replay.find((t) => t.name === 'tools')!.columns.map((c) => c.name)).not.toContain('legacy_code');
    const raw = last.diagnostics.filter((d) => d.code === 'knex/raw-sql');
    expect(raw.filter((d) => d.file === `db/migrations/${RAW_DDL_MIGRATION}`).map((d) => [d.severity, d.line])).toEqual([
      ['warning', 3],
      ['warning', 4],
    ]);
    expect(raw.filter((d) => d.file === 'db/migrations/20250120_raw_data.js').map((d) => [d.severity, d.line])).toEqual([['info', 3]]);
    expect(last.counters).toMatchObject({ rawStatements: 3, rawSchemaStatements: 2 });
    // before the raw migrations were committed there was nothing to count
    const before = doc.versions.find((v) => v.subject.startsWith('Settings belong'))!;
    expect(before.counters).toMatchObject({ rawStatements: 0, rawSchemaStatements: 0 });
  });
});
