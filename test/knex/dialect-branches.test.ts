// Migrations that branch on the database in use (test/fixtures/knex/dialect-branches: our own
// co-op workshop), against Knex itself: the same migrations run by Knex on SQLite
// (better-sqlite3) and on PostgreSQL (PGlite through Knex's PostgreSQL client), introspected after
// every migration, and the replay for the matching client. The forms: knex.client.dialect,
// driverName and config.client; ===, ==, !==, !=; includes on a literal list; a switch; a const
// boolean; a transaction's client; an alias of knex; a ternary inside a call. With no client
// known, the replay takes each first branch and says so (knex/condition-unknown), as before.
// What Knex's client objects hold is checked against Knex's own classes.
import { createRequire } from 'node:module';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PGlite } from '@electric-sql/pglite';
import { extractHistory, snapshotOfVersion, toDocument, type NeutralType } from '@schema-strata/core';
import knexAdapter, { KnexSession, knexOptions, parseKnexSource, type KnexFacts } from '@schema-strata/adapter-knex';
import { fixtureRepository, loadFixture, replayTree, tablesOf } from './fixture.js';
import { resetPg, runKnex } from './oracle.js';
import { fromDatabase, fromReplay, neutralOfPg } from './compare.js';

const require = createRequire(import.meta.url);
const history = loadFixture('dialect-branches');
const tree = history.trees[history.trees.length - 1]!;
const name = (p: string): string => p.slice(p.lastIndexOf('/') + 1);
const clean = (t: NeutralType): unknown => JSON.parse(JSON.stringify(t));

let pg: PGlite;

beforeAll(async () => {
  pg = await PGlite.create();
});

afterAll(async () => {
  await pg?.close();
});

/** The replay of the last commit for some options: the schema after each migration, and the diagnostics' codes. */
async function replay(options: Record<string, string>): Promise<{ steps: Awaited<ReturnType<typeof replayTree>>['steps']; codes: string[] }> {
  const r = await replayTree(tree, options);
  return { steps: r.steps.filter((s) => s.role === 'migration'), codes: r.diagnostics.map((d) => `${d.code}@${name(d.file ?? '')}:${d.line}`) };
}

describe('conditions on the database in use (oracle: Knex 3 on better-sqlite3)', () => {
  // the knexfile's development client, and --knex-client over a knexfile whose client is not known
  const runs: Array<Record<string, string>> = [{ 'knex-environment': 'development' }, { 'knex-environment': 'staging', 'knex-client': 'better-sqlite3' }];
  for (const options of runs) {
    it(`agrees with SQLite after every migration (${JSON.stringify(options)})`, async () => {
      const oracle = await runKnex(tree, { engine: 'sqlite', environment: 'development', each: true });
      const { steps, codes } = await replay(options);
      expect(steps.map((s) => name(s.path))).toEqual(oracle.migrations);
      expect(oracle.migrations.length).toBe(6);
      steps.forEach((s, i) => {
        expect(fromReplay(tablesOf(s.snapshot), 'sqlite'), `after ${oracle.migrations[i]}`).toEqual(fromDatabase(oracle.after[i]!.tables, 'sqlite'));
      });
      expect(codes.filter((c) => c.startsWith('knex/condition-unknown'))).toEqual([]);
      // the branches SQLite took (a check that the comparison above saw them)
      const last = fromDatabase(oracle.final, 'sqlite');
      expect(last['tools']!.columns).toEqual(['id', 'label', 'owner_id', 'notes', 'size_class', 'shelf']);
      expect(last['repairs']!.columns).toContain('cost_cents');
      expect(last['reservations']!.columns).toEqual(['id', 'tool_id', 'member_id', 'starts_at', 'slot']);
    });
  }

  it('agrees with Knex at every commit of the history (the fold across versions, through git)', async () => {
    const repo = await fixtureRepository('dialect-branches');
    const doc = toDocument(await extractHistory({ repo: repo.dir, adapter: knexAdapter, adapterOptions: { 'knex-environment': 'development' } }), { name: 'test', version: '0' });
    for (let i = 0; i < repo.history.trees.length; i++) {
      const oracle = await runKnex(repo.history.trees[i]!, { engine: 'sqlite', environment: 'development' });
      const v = doc.versions.find((x) => x.commit === repo.commitIds[i])!;
      expect(fromReplay(tablesOf(snapshotOfVersion(doc, v.index)!), 'sqlite'), `commit ${i}`).toEqual(fromDatabase(oracle.final, 'sqlite'));
    }
  });
});

describe('conditions on the database in use (oracle: Knex 3 with its PostgreSQL client on PGlite)', () => {
  // config.client is the name as configured: 'pg' and 'postgresql' are one client but differ there
  const runs: Array<{ options: Record<string, string>; clientName: string }> = [
    { options: { 'knex-environment': 'production' }, clientName: 'pg' },
    { options: { 'knex-environment': 'development', 'knex-client': 'postgresql' }, clientName: 'postgresql' },
  ];
  for (const { options, clientName } of runs) {
    it(`agrees with PostgreSQL after every migration, types included (${JSON.stringify(options)})`, async () => {
      await resetPg(pg);
      const oracle = await runKnex(tree, { engine: 'pglite', pglite: pg, environment: 'production', each: true, clientName });
      const { steps, codes } = await replay(options);
      expect(steps.map((s) => name(s.path))).toEqual(oracle.migrations);
      steps.forEach((s, i) => {
        const db = oracle.after[i]!.tables;
        expect(fromReplay(tablesOf(s.snapshot), 'pg'), `after ${oracle.migrations[i]}`).toEqual(fromDatabase(db, 'pg'));
        for (const t of tablesOf(s.snapshot)) {
          const dt = db.find((x) => x.name === t.name)!;
          for (const c of t.columns) expect(clean(c.type), `${t.name}.${c.name} after ${oracle.migrations[i]}`).toEqual(clean(neutralOfPg(dt, c.name)));
        }
      });
      expect(codes.filter((c) => c.startsWith('knex/condition-unknown'))).toEqual([]);
      const last = fromDatabase(oracle.final, 'pg');
      expect(last['tools']!.columns).toEqual(['id', 'label', 'notes', 'owner_id', 'size_class', 'shelf']);
      expect(last['loans']!.columns).toEqual(clientName === 'pg' ? ['id', 'tool_id', 'member_id', 'terms'] : ['id', 'tool_id', 'member_id', 'terms_json', 'returned']);
      expect(last['reservations']!.columns).toEqual(['id', 'tool_id', 'member_id', 'starts_at', 'note']);
    });
  }
});

describe('conditions on the database with no client known', () => {
  it('takes each first branch and reports it, as before', async () => {
    const { steps, codes } = await replay({ 'knex-environment': 'staging' });
    const tables = fromReplay(tablesOf(steps[steps.length - 1]!.snapshot), 'pg');
    expect(tables['tools']!.columns).toEqual(['id', 'label', 'owner_id', 'notes', 'size_class', 'shelf']);
    expect(tables['loans']!.columns).toEqual(['id', 'tool_id', 'member_id', 'terms', 'returned']);
    expect(tables['reservations']!.columns).toEqual(['id', 'tool_id', 'member_id', 'starts_at']);
    expect(tables['repairs']!.columns).toEqual(['id', 'tool_id', 'cost', 'description']);
    expect(tables['members']!.columns).toEqual(['id', 'name', 'email', 'phone']);
    expect(codes.filter((c) => !c.startsWith('knex/knexfile'))).toEqual([
      'knex/condition-unknown@20240315_tool_notes.js:4',
      'knex/condition-unknown@20240402_loans.js:6',
      'knex/condition-unknown@20240402_loans.js:11',
      'knex/condition-unknown@20240420_reservations.ts:9',
      'knex/condition-unknown@20240420_reservations.ts:16',
      'knex/condition-unknown@20240505_repairs.js:6',
      'knex/condition-unknown@20240601_member_contact.js:2',
      'knex/condition-unknown@20240601_member_contact.js:18',
    ]);
  });
});

describe("what knex.client holds (oracle: Knex's client classes)", () => {
  it("matches each client name Knex accepts: the prototype's dialect and driverName, and config.client as configured", async () => {
    const { SUPPORTED_CLIENTS } = require('knex/lib/constants.js') as { SUPPORTED_CLIENTS: string[] };
    const { getDialectByNameOrAlias } = require('knex/lib/dialects/index.js') as { getDialectByNameOrAlias: (n: string) => { prototype: { dialect: string; driverName: string } } };
    const { KNEX_CLIENT_NAMES, knexClient } = await import('@schema-strata/adapter-knex');
    expect([...KNEX_CLIENT_NAMES].sort()).toEqual([...SUPPORTED_CLIENTS].sort());
    for (const n of SUPPORTED_CLIENTS) {
      const proto = getDialectByNameOrAlias(n).prototype;
      expect(knexClient(n), n).toEqual({ dialect: proto.dialect, driverName: proto.driverName, configClient: n });
    }
    // instances of the clients whose drivers are installed here, and a configuration that names its client as `dialect`
    const Knex = require('knex') as (c: object) => { client: { dialect: string; driverName: string; config: { client?: string } }; destroy(): Promise<void> };
    for (const [config, key] of [[{ client: 'pg' }, 'client'], [{ client: 'better-sqlite3', connection: { filename: ':memory:' }, useNullAsDefault: true }, 'client'], [{ dialect: 'pg' }, 'dialect']] as const) {
      const k = Knex(config);
      const n = 'client' in config ? config.client : config.dialect;
      expect(knexClient(n, key), n).toEqual({ dialect: k.client.dialect, driverName: k.client.driverName, ...(k.client.config.client !== undefined ? { configClient: k.client.config.client } : {}) });
      await k.destroy();
    }
    expect(knexClient('oracle')).toBeUndefined();
    expect(() => Knex({ client: 'oracle' })).toThrow(/Unknown configuration option 'client' value oracle/);
  });
});

describe('a session whose knexfile changes its client', () => {
  it('replays the migrations again for the new client, as a fresh fold does', () => {
    const parsed = (text: string): KnexFacts => (parseKnexSource(text) as { facts: KnexFacts }).facts;
    const migrations = [...tree].filter(([p]) => p.startsWith('migrations/')).sort().map(([path, text]) => ({ path, blob: path, facts: parsed(text) }));
    const knexfile = (client: string) => ({ path: 'knexfile.js', blob: client, facts: parsed(`module.exports = { client: '${client}', migrations: { directory: './migrations', loadExtensions: ['.js', '.ts'] } };\n`) });
    const session = new KnexSession(knexOptions({}));
    // pg, postgresql and cockroachdb are one family of types; their config.client and driverName differ
    for (const client of ['pg', 'postgresql', 'cockroachdb', 'pg', 'better-sqlite3', 'mysql2']) {
      const input = { files: [knexfile(client), ...migrations], missing: [] };
      const got = session.assemble(input);
      const fresh = new KnexSession(knexOptions({})).assemble(input);
      expect(got, client).toEqual(fresh);
      expect('diagnostics' in got && got.diagnostics.map((d) => d.code), client).toEqual([]);
    }
  });
});
