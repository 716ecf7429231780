// Counted `for` loops and tables that raw SQL creates, against Knex itself: each case is a tiny
// co-op project (a knexfile and its migrations) that Knex runs on SQLite (better-sqlite3) and the
// adapter replays. A counted loop (`for (let i = A; i < B; i++)` and its kin) is replayed over the
// range of its counter; raw SQL is still not interpreted, but a statement repeated at one place is
// counted each time and reported once, and a builder call on a table that raw SQL created says so
// (Knex does not fail there) instead of saying that Knex would fail. A loop that is not replayed
// but only moves data (raw data statements, progress printed with console.log) is left out
// silently. What cannot be known statically (a bound from the environment, a counter the body
// changes) is a diagnostic.
import { describe, expect, it } from 'vitest';
import type { Diagnostic } from '@schema-strata/core';
import { KnexSession, knexOptions, parseKnexSource, type KnexFacts } from '@schema-strata/adapter-knex';
import { replayTree, tablesOf } from './fixture.js';
import { runKnex } from './oracle.js';
import { fromDatabase, fromReplay } from './compare.js';

const KNEXFILE = "module.exports = { client: 'better-sqlite3', useNullAsDefault: true, migrations: { directory: './migrations', loadExtensions: ['.js', '.ts'] } };\n";

const COUNTED = {
  'limits.js': 'module.exports = { BINS: 2 };\n',
  'migrations/001_tools.js': [
    "const { BINS } = require('../limits');",
    'const SHELVES = 3;',
    'exports.up = async (knex) => {',
    "  await knex.schema.createTable('tools', (t) => {",
    "    t.increments('id');",
    "    t.string('label', 80).notNullable();",
    '    for (let slot = 0; slot < 2; slot += 1) t.integer(`slot_${slot}_member_id`);',
    "    for (let b = 0; BINS > b; ++b) t.string('bin_' + b, 8);",
    '  });',
    '  for (let i = 1; i <= SHELVES; i++) {',
    '    await knex.schema.createTable(`shelf_${i}`, (t) => {',
    "      t.increments('id');",
    "      t.integer('tool_id').references('id').inTable('tools');",
    '    });',
    '  }',
    '  for (let week = 0; week < 8; week = week + 2) {',
    '    if (week === 4) continue;',
    '    if (week === 6) break;',
    "    await knex.schema.alterTable('tools', (t) => { t.date(`due_week_${week}`); });",
    '  }',
    '};',
    'exports.down = () => {};',
    '',
  ].join('\n'),
  'migrations/002_members.ts': [
    "import type { Knex } from 'knex';",
    'const LEVELS = 3;',
    'export async function up(knex: Knex): Promise<void> {',
    "  await knex.schema.createTable('members', (t) => {",
    "    t.increments('id');",
    '    for (let level: number = 1; level < LEVELS; level++) t.boolean(`trained_level_${level}`).notNullable().defaultTo(false);',
    '  });',
    '}',
    'export async function down(): Promise<void> {}',
    '',
  ].join('\n'),
};

const RAW = [
  'exports.up = async (knex) => {',
  '  await knex.raw(\'CREATE TABLE "repairs" (id integer primary key, tool_id integer)\');',
  '  for (let i = 0; i < 4; i++) {',
  '    await knex.raw(`CREATE TABLE tool_bin_${i} (id integer primary key)`);',
  '  }',
  "  await knex.schema.alterTable('repairs', (t) => { t.string('note'); });",
  "  await knex.schema.renameTable('repairs', 'tool_repairs');",
  "  await knex.schema.alterTable('tool_repairs', (t) => { t.integer('cost_cents'); });",
  "  await knex.schema.createTable('loans', (t) => { t.increments('id'); });",
  '};',
  'exports.down = () => {};',
  '',
].join('\n');

const project = (files: Record<string, string>): Map<string, string> => new Map([['knexfile.js', KNEXFILE], ...Object.entries(files)]);

/** The diagnostics of one migration text replayed alone (no oracle: what cannot be known statically). */
function diagnosticsOf(text: string): Diagnostic[] {
  const facts = (parseKnexSource(text) as { facts: KnexFacts }).facts;
  const r = new KnexSession(knexOptions({})).assemble({ files: [{ path: 'migrations/001.js', blob: 'b', facts }], missing: [] });
  return 'diagnostics' in r ? r.diagnostics : [];
}

describe('counted for loops (oracle: Knex 3 running the migrations on better-sqlite3)', () => {
  it('are replayed over the range of their counter, as Knex runs them', async () => {
    const tree = project(COUNTED);
    const oracle = await runKnex(tree, { engine: 'sqlite', environment: 'development', each: true });
    const r = await replayTree(tree, { 'knex-client': 'sqlite' });
    const steps = r.steps.filter((s) => s.role === 'migration');
    expect(steps.map((s) => s.path.slice(s.path.lastIndexOf('/') + 1))).toEqual(oracle.migrations);
    steps.forEach((s, i) => {
      expect(fromReplay(tablesOf(s.snapshot), 'sqlite'), `after ${oracle.migrations[i]}`).toEqual(fromDatabase(oracle.after[i]!.tables, 'sqlite'));
    });
    // what Knex made of the loops (a check that the comparison above saw them)
    const db = fromDatabase(oracle.final, 'sqlite');
    expect(Object.keys(db).sort()).toEqual(['members', 'shelf_1', 'shelf_2', 'shelf_3', 'tools']);
    expect(db['tools']!.columns).toEqual(['id', 'label', 'slot_0_member_id', 'slot_1_member_id', 'bin_0', 'bin_1', 'due_week_0', 'due_week_2']);
    expect(db['members']!.columns).toEqual(['id', 'trained_level_1', 'trained_level_2']);
    expect(r.diagnostics.filter((d) => d.severity !== 'info')).toEqual([]);
  });

  it('whose rounds are not known statically are reported and left out', () => {
    const loop = (head: string, first = ''): string =>
      `exports.up = async (knex) => {\n  ${head} {\n${first}    await knex.schema.createTable(\`shelf_\${i}\`, (t) => { t.increments('id'); });\n  }\n};\nexports.down = () => {};\n`;
    const codes = (text: string): string[] => diagnosticsOf(text).map((d) => `${d.code}@${d.line}`);
    // a bound from the environment, and more rounds than the replay goes through
    expect(codes(loop('for (let i = 0; i < Number(process.env.SHELVES); i++)'))).toEqual(['knex/loop-unknown@2']);
    expect(diagnosticsOf(loop('for (let i = 0; i < Number(process.env.SHELVES); i++)'))[0]!.message).toContain('0 up to Number(process.env.SHELVES)');
    expect(codes(loop('for (let i = 0; i < 20000; i++)'))).toEqual(['knex/loop-unknown@2']);
    // a counter the body changes, a step that is not a positive literal, no condition: no plain range
    expect(codes(loop('for (let i = 0; i < 3; i++)', '    i += 1;\n'))).toEqual(['knex/not-followed@2']);
    expect(codes(loop('for (let i = 0; i < 3; i += step)'))).toEqual(['knex/not-followed@2']);
    expect(codes(loop('for (let i = 0; ; i++)'))).toEqual(['knex/not-followed@2']);
  });
});

describe('loops of raw data statements (oracle: Knex 3 running the migrations on better-sqlite3)', () => {
  const MOVES = [
    'exports.up = async (knex) => {',
    "  await knex.schema.createTable('loans', (t) => { t.increments('id'); t.integer('tool_id'); t.integer('days').notNullable().defaultTo(7); });",
    "  await knex('loans').insert([{ tool_id: 1 }, { tool_id: 2 }]);",
    '  let open = 2;',
    '  while (open > 0) {',
    "    const rows = await knex.raw('SELECT id FROM loans WHERE days < 14 LIMIT 1');",
    '    if (rows.length === 0) break;',
    '    await knex.raw(`UPDATE loans SET days = days + 7 WHERE id = ${rows[0].id}`);',
    "    for (const row of rows) console.log('loan extended', row.id, JSON.stringify(row));",
    '    open--;',
    '  }',
    '};',
    'exports.down = () => {};',
    '',
  ].join('\n');

  it('change no schema: the loop is left out silently', async () => {
    const tree = project({ 'migrations/001_moves.js': MOVES });
    const oracle = await runKnex(tree, { engine: 'sqlite', environment: 'development' });
    const r = await replayTree(tree, { 'knex-client': 'sqlite' });
    expect(fromReplay(tablesOf(r.steps[r.steps.length - 1]!.snapshot), 'sqlite')).toEqual(fromDatabase(oracle.final, 'sqlite'));
    expect(r.diagnostics.filter((d) => d.severity !== 'info')).toEqual([]);
    // a loop of raw schema statements, or of SQL not known statically, is still reported
    const codes = (text: string): string[] => diagnosticsOf(text).filter((d) => d.severity !== 'info').map((d) => `${d.code}@${d.line}`);
    expect(codes(MOVES.replace('`UPDATE loans SET days', '`ALTER TABLE loans ADD COLUMN'))).toEqual(['knex/not-followed@5']);
    expect(codes(MOVES.replace('`UPDATE loans SET days', '`${verb} loans SET days'))).toEqual(['knex/not-followed@5']);
  });
});

describe('tables raw SQL creates (oracle: Knex 3 running the migrations on better-sqlite3)', () => {
  it('are not in the replay; builder calls on them say so, and repeated raw statements are counted each time', async () => {
    const tree = project({ 'migrations/001_raw.js': RAW });
    // Knex runs it without failing: the raw tables exist, and the builder calls on them work
    const oracle = await runKnex(tree, { engine: 'sqlite', environment: 'development' });
    const db = fromDatabase(oracle.final, 'sqlite');
    expect(db['tool_repairs']!.columns).toEqual(['id', 'tool_id', 'note', 'cost_cents']);
    const r = await replayTree(tree, { 'knex-client': 'sqlite' });
    const last = r.steps[r.steps.length - 1]!.snapshot;
    const replayed = fromReplay(tablesOf(last), 'sqlite');
    expect(replayed).toEqual({ loans: db['loans'] });
    // every table Knex has and the replay has not comes from a raw statement, counted
    const fromRaw = Object.keys(db).filter((n) => !(n in replayed));
    expect(fromRaw.sort()).toEqual(['tool_bin_0', 'tool_bin_1', 'tool_bin_2', 'tool_bin_3', 'tool_repairs']);
    const session = new KnexSession(knexOptions({ 'knex-client': 'sqlite' }));
    const facts = (parseKnexSource(RAW) as { facts: KnexFacts }).facts;
    const result = session.assemble({ files: [{ path: 'migrations/001_raw.js', blob: 'b', facts }], missing: [] });
    expect('counters' in result && result.counters).toMatchObject({ rawStatements: fromRaw.length, rawSchemaStatements: fromRaw.length });
    // one diagnostic per place of raw SQL, the loop's with its count
    const raw = r.diagnostics.filter((d) => d.code === 'knex/raw-sql');
    expect(raw.map((d) => d.line)).toEqual([2, 4]);
    expect(raw[1]!.message).toMatch(/CREATE TABLE tool_bin_0 .*\(4 statements at this place, the first shown\)$/);
    // the builder calls on the raw table name the raw statement, not a failure of Knex
    const missing = r.diagnostics.filter((d) => d.code === 'knex/no-such-table');
    expect(missing.map((d) => d.line)).toEqual([6, 7, 8]);
    for (const d of missing) {
      expect(d.message).toContain('raw SQL at migrations/001_raw.js:2 created it');
      expect(d.message).not.toContain('Knex would fail');
    }
  });

  it('say that Knex would fail only where it does', async () => {
    const text = RAW.replace("'repairs', (t) => { t.string('note'); }", "'tool_parts', (t) => { t.string('note'); }");
    const tree = project({ 'migrations/001_raw.js': text });
    await expect(runKnex(tree, { engine: 'sqlite', environment: 'development' })).rejects.toThrow(/tool_parts/);
    const d = (await replayTree(tree, { 'knex-client': 'sqlite' })).diagnostics.find((x) => x.code === 'knex/no-such-table' && x.line === 6)!;
    expect(d.message).toBe('table tool_parts does not exist at this point of the replay (Knex would fail here); its changes are left out');
  });
});
