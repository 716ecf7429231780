// The schema unqualified names resolve to (--knex-schema, else the knexfile's searchPath), against
// Knex itself on PGlite: a co-op project whose connection sets `searchPath: ['coop']` creates
// tables both with withSchema('coop') and unqualified, alters one under the other spelling, and
// puts one table in public explicitly. Knex's PostgreSQL client sets the search path on its
// connection (its own `set search_path to` statement, run through PGlite by the oracle's client);
// the replay, with the option or with the knexfile's searchPath alone, must give the same tables,
// and with neither the two spellings part. A session must fold anew when the searchPath changes.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PGlite } from '@electric-sql/pglite';
import { KnexSession, knexOptions, parseKnexSource, type KnexFacts } from '@schema-strata/adapter-knex';
import type { DbTable } from './oracle.js';
import { runKnex } from './oracle.js';
import { replayTree, tablesOf } from './fixture.js';
import { fromDatabase, fromReplay } from './compare.js';

const TREE = new Map<string, string>([
  ['knexfile.js', "module.exports = { client: 'pg', searchPath: ['coop'], migrations: { directory: './migrations' } };\n"],
  [
    'migrations/001_tools.js',
    "exports.up = (knex) => knex.schema.withSchema('coop').createTable('tools', (t) => {\n  t.increments('id');\n  t.string('label', 80).notNullable();\n});\nexports.down = () => {};\n",
  ],
  [
    'migrations/002_members.js',
    "exports.up = (knex) => knex.schema.createTable('members', (t) => {\n  t.increments('id');\n  t.integer('tool_id').references('id').inTable('coop.tools');\n});\nexports.down = () => {};\n",
  ],
  [
    'migrations/003_phone.js',
    "exports.up = async (knex) => {\n  await knex.schema.withSchema('coop').alterTable('members', (t) => { t.string('phone', 20); });\n  await knex.schema.alterTable('tools', (t) => { t.boolean('lent').notNullable().defaultTo(false); });\n  await knex.schema.withSchema('public').createTable('audit_notes', (t) => { t.increments('id'); t.text('note'); });\n};\nexports.down = () => {};\n",
  ],
]);

/** The database as the replay names its tables when coop is the default schema: coop unqualified, public qualified. */
function withCoopDefault(db: DbTable[]): DbTable[] {
  const rename = (qualified: string): string => (qualified.startsWith('coop.') ? qualified.slice(5) : qualified.includes('.') ? qualified : `public.${qualified}`);
  return db.map((t) => {
    const { schema, ...rest } = t;
    return {
      ...rest,
      ...(schema === 'coop' ? {} : { schema: schema ?? 'public' }),
      foreignKeys: t.foreignKeys.map((f) => ({ ...f, table: rename(f.table) })),
    };
  });
}

let pg: PGlite;
/** Knex's own run of TREE, migration by migration (once: the database keeps what it ran). */
let oracle: Awaited<ReturnType<typeof runKnex>>;

beforeAll(async () => {
  pg = await PGlite.create();
  await pg.exec('create schema coop');
  oracle = await runKnex(TREE, { engine: 'pglite', pglite: pg, environment: 'production', searchPath: ['coop'], each: true });
});

afterAll(async () => {
  await pg?.close();
});

describe('the schema of unqualified names (oracle: Knex 3 with its PostgreSQL client and a searchPath on PGlite)', () => {
  it('with --knex-schema, withSchema(NAME) and unqualified names are one table, as in the database', async () => {
    // what Knex made of it (a check that the comparison below sees both spellings)
    expect(oracle.final.map((t) => `${t.schema ?? 'public'}.${t.name}`).sort()).toEqual(['coop.members', 'coop.tools', 'public.audit_notes']);
    const r = await replayTree(TREE, { 'knex-client': 'pg', 'knex-schema': 'coop' });
    const steps = r.steps.filter((s) => s.role === 'migration');
    expect(steps).toHaveLength(3);
    steps.forEach((s, i) => {
      expect(fromReplay(tablesOf(s.snapshot), 'pg'), `after ${oracle.migrations[i]}`).toEqual(fromDatabase(withCoopDefault(oracle.after[i]!.tables), 'pg'));
    });
    expect(r.diagnostics.filter((d) => d.severity !== 'info')).toEqual([]);
  });

  it("without the option, the knexfile's searchPath sets it, as Knex applies it on every connection", async () => {
    const r = await replayTree(TREE, { 'knex-client': 'pg' });
    expect(r.steps.filter((s) => s.role === 'migration')).toHaveLength(3);
    const steps = r.steps.filter((s) => s.role === 'migration');
    steps.forEach((s, i) => {
      expect(fromReplay(tablesOf(s.snapshot), 'pg'), `after ${oracle.migrations[i]}`).toEqual(fromDatabase(withCoopDefault(oracle.after[i]!.tables), 'pg'));
    });
    expect(r.diagnostics.filter((d) => d.severity !== 'info')).toEqual([]);
  });

  it('with no searchPath known, the unqualified names are public ones and the replay parts from the database', async () => {
    // the same migrations, the knexfile without its searchPath (or the option naming public over it)
    const bare = new Map(TREE).set('knexfile.js', "module.exports = { client: 'pg', migrations: { directory: './migrations' } };\n");
    for (const [tree, options] of [[bare, { 'knex-client': 'pg' }], [TREE, { 'knex-client': 'pg', 'knex-schema': 'public' }]] as const) {
      const r = await replayTree(tree, options);
      const last = tablesOf(r.steps[r.steps.length - 1]!.snapshot);
      expect(last.map((t) => t.id).sort()).toEqual(['audit_notes', 'coop.tools', 'members']);
      expect(r.diagnostics.map((d) => `${d.code}@${d.file}:${d.line}`)).toEqual(['knex/no-such-table@migrations/003_phone.js:2', 'knex/no-such-table@migrations/003_phone.js:3']);
    }
  });

  it("a searchPath that is not known statically is said, and unqualified names stay in the client's default schema", async () => {
    const dynamic = new Map(TREE).set('knexfile.js', "module.exports = { client: 'pg', searchPath: [process.env.DB_SCHEMA], migrations: { directory: './migrations' } };\n");
    const r = await replayTree(dynamic, { 'knex-client': 'pg' });
    expect(r.diagnostics.find((d) => d.code === 'knex/knexfile')?.message).toMatch(/searchPath is not known statically/);
    expect(tablesOf(r.steps[r.steps.length - 1]!.snapshot).map((t) => t.id).sort()).toEqual(['audit_notes', 'coop.tools', 'members']);
  });

  it("a version whose knexfile changes its searchPath is folded anew, as a fresh fold gives it (the migrations' own steps are not reused)", () => {
    const facts = (text: string): KnexFacts => (parseKnexSource(text) as { facts: KnexFacts }).facts;
    // one facts object per blob, as core hands them over: the migrations are the same in both versions
    const migrations = [...TREE].filter(([p]) => p !== 'knexfile.js').map(([path, text]) => ({ path, blob: path, facts: facts(text) }));
    const version = (knexfile: string) => ({ files: [{ path: 'knexfile.js', blob: knexfile, facts: facts(knexfile) }, ...migrations], missing: [] });
    const first = version(TREE.get('knexfile.js')!);
    const second = version("module.exports = { client: 'pg', migrations: { directory: './migrations' } };\n");
    const session = new KnexSession(knexOptions({ 'knex-client': 'pg' }));
    const a = session.assemble(first);
    const b = session.assemble(second);
    const ids = (r: ReturnType<KnexSession['assemble']>): string[] => ('snapshot' in r ? r.snapshot.tables.map((t) => t.id ?? '').sort() : []);
    expect(ids(a)).toEqual(['members', 'public.audit_notes', 'tools']);
    expect(ids(b)).toEqual(ids(new KnexSession(knexOptions({ 'knex-client': 'pg' })).assemble(second)));
    expect(ids(b)).toEqual(['audit_notes', 'coop.tools', 'members']);
  });

  it('a version that only appends migrations keeps the searchPath of the plan it extends (against a fresh fold)', () => {
    const facts = (text: string): KnexFacts => (parseKnexSource(text) as { facts: KnexFacts }).facts;
    const files = [...TREE].map(([path, text]) => ({ path, blob: path, facts: facts(text) }));
    const session = new KnexSession(knexOptions({ 'knex-client': 'pg' }));
    session.assemble({ files: files.slice(0, 3), missing: [] });
    const appended = session.assemble({ files, missing: [] });
    expect(session.plansExtended).toBe(1);
    const fresh = new KnexSession(knexOptions({ 'knex-client': 'pg' })).assemble({ files, missing: [] });
    expect('snapshot' in appended && appended.snapshot.tables.map((t) => t.id).sort()).toEqual(['members', 'public.audit_notes', 'tools']);
    expect('snapshot' in appended && appended.snapshot).toEqual('snapshot' in fresh && fresh.snapshot);
  });
});
