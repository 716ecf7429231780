// Migrations that read settings the project never declares in them (an environment variable, an
// application's global settings object), against Knex itself: the same migrations run by Knex 3 on
// SQLite (better-sqlite3) with those settings in place, introspected after every migration, and
// the replay told the same values with --knex-assume. Without the flag the replay takes each first
// branch and its diagnostic names the flag for each read it could not know.
import { afterEach, describe, expect, it } from 'vitest';
import { replayTree, tablesOf } from './fixture.js';
import { runKnex } from './oracle.js';
import { fromDatabase, fromReplay } from './compare.js';

const tree = new Map<string, string>([
  ['knexfile.js', "module.exports = {\n  development: { client: 'better-sqlite3', migrations: { directory: './migrations' } },\n};\n"],
  [
    'migrations/20240301_tools.js',
    "exports.up = async (knex) => {\n  await knex.schema.createTable('tools', (t) => {\n    t.increments('id');\n    t.string('label').notNullable();\n    if (process.env.COOP_SITE === 'north') t.string('shed');\n    else t.string('aisle');\n  });\n};\nexports.down = () => {};\n",
  ],
  [
    'migrations/20240302_lending.js',
    "/* global COOP */\nexports.up = async (knex) => {\n  switch (COOP.settings.lending.mode) {\n    case 'deposit':\n      await knex.schema.createTable('deposits', (t) => {\n        t.increments('id');\n        t.integer('tool_id').references('id').inTable('tools');\n        t.integer('cents').notNullable();\n      });\n      break;\n    default:\n      await knex.schema.createTable('loans', (t) => {\n        t.increments('id');\n        t.integer('tool_id').references('id').inTable('tools');\n      });\n  }\n  if (COOP.settings.trackRepairs) {\n    await knex.schema.alterTable('tools', (t) => {\n      t.integer('repairs').notNullable().defaultTo(0);\n    });\n  }\n};\nexports.down = () => {};\n",
  ],
  [
    'migrations/20240303_notes.ts',
    "export async function up(knex: any): Promise<void> {\n  const site = process.env['COOP_SITE'] ?? 'south';\n  await knex.schema.createTable(`notes_${site}`, (t: any) => {\n    t.increments('id');\n    t.text('body');\n  });\n}\nexport async function down(): Promise<void> {}\n",
  ],
]);

const name = (p: string): string => p.slice(p.lastIndexOf('/') + 1);
const globals = globalThis as { COOP?: unknown };

afterEach(() => {
  delete process.env['COOP_SITE'];
  delete process.env['COOP_CLIENT'];
  delete process.env['COOP_STEPS'];
  delete globals.COOP;
});

describe('--knex-assume (oracle: Knex 3 on better-sqlite3, run with the same settings)', () => {
  const settings = [
    { site: 'north', mode: 'deposit', trackRepairs: true },
    { site: 'south', mode: 'lend', trackRepairs: false },
  ];
  for (const s of settings) {
    it(`takes the branches Knex takes (${JSON.stringify(s)})`, async () => {
      process.env['COOP_SITE'] = s.site;
      globals.COOP = { settings: { lending: { mode: s.mode }, trackRepairs: s.trackRepairs } };
      const oracle = await runKnex(tree, { engine: 'sqlite', environment: 'development', each: true });
      const r = await replayTree(tree, {
        'knex-environment': 'development',
        'knex-assume': [`process.env.COOP_SITE=${s.site}`, `COOP.settings.lending.mode=${s.mode}`, `COOP.settings.trackRepairs=${s.trackRepairs}`],
      });
      const steps = r.steps.filter((x) => x.role === 'migration');
      expect(steps.map((x) => name(x.path))).toEqual(oracle.migrations);
      expect(oracle.migrations.length).toBe(3);
      steps.forEach((x, i) => {
        expect(fromReplay(tablesOf(x.snapshot), 'sqlite'), `after ${oracle.migrations[i]}`).toEqual(fromDatabase(oracle.after[i]!.tables, 'sqlite'));
      });
      expect(r.diagnostics.filter((d) => d.code === 'knex/condition-unknown')).toEqual([]);
      // the branches Knex took (a check that the comparison above saw them)
      const last = fromDatabase(oracle.final, 'sqlite');
      expect(Object.keys(last).sort()).toEqual([s.mode === 'deposit' ? 'deposits' : 'loans', `notes_${s.site}`, 'tools'].sort());
      expect(last['tools']!.columns).toEqual(['id', 'label', s.site === 'north' ? 'shed' : 'aisle', ...(s.trackRepairs ? ['repairs'] : [])]);
    });
  }

  it('without it: each first branch, and a diagnostic that names the flag for what was read', async () => {
    const r = await replayTree(tree, { 'knex-environment': 'development' });
    const unknown = r.diagnostics.filter((d) => d.code === 'knex/condition-unknown').map((d) => [name(d.file ?? ''), d.line, d.message.replace(/^.*\(to decide it, say what it reads: (.*)\)$/, '$1')]);
    expect(unknown).toEqual([
      ['20240301_tools.js', 5, '--knex-assume process.env.COOP_SITE=VALUE'],
      ['20240302_lending.js', 3, '--knex-assume COOP.settings.lending.mode=VALUE'],
      ['20240302_lending.js', 17, '--knex-assume COOP.settings.trackRepairs=VALUE'],
    ]);
    const tables = tablesOf(r.steps[r.steps.length - 1]!.snapshot);
    expect(tables.map((t) => t.name).sort()).toEqual(['deposits', 'notes_south', 'tools']);
    expect(tables.find((t) => t.name === 'tools')!.columns.map((c) => c.name)).toEqual(['id', 'label', 'shed', 'repairs']);
  });

  it('values: JSON scalars are typed, other text is a string, under process.env always a string', async () => {
    const only = new Map([
      ['knexfile.js', tree.get('knexfile.js')!],
      [
        'migrations/20240304_kinds.js',
        "const { env } = require('node:process');\nexports.up = async (knex) => {\n  await knex.schema.createTable('kinds', (t) => {\n    t.increments('id');\n    if (env.COOP_LIMIT === '3') t.integer('imported_env_three');\n    if (COOP.limit === 3) t.integer('three');\n    if (COOP.label === '3') t.integer('label_three');\n    if (COOP.off === false) t.integer('off');\n    if (process.env.COOP_LIMIT === '3') t.integer('env_three');\n    if (COOP.nothing === null) t.integer('nothing');\n    if (COOP.db.client.config.client === 'better-sqlite3') t.integer('on_sqlite');\n  });\n};\nexports.down = () => {};\n",
      ],
    ]);
    const r = await replayTree(only, {
      'knex-environment': 'development',
      'knex-assume': ['COOP.limit=3', 'COOP.label="3"', 'COOP.off=false', 'process.env.COOP_LIMIT=3', 'COOP.nothing = null'],
    });
    expect(r.diagnostics.filter((d) => d.code === 'knex/condition-unknown')).toEqual([]);
    const kinds = tablesOf(r.steps[r.steps.length - 1]!.snapshot)[0]!;
    // (`.client` of a value not known is a knex instance's, decided by the knexfile's client)
    expect(kinds.columns.map((c) => c.name)).toEqual(['id', 'imported_env_three', 'three', 'label_three', 'off', 'env_three', 'nothing', 'on_sqlite']);
  });

  it('a condition on knex.client with no client known names --knex-client', async () => {
    const noClient = new Map([
      ['knexfile.js', "module.exports = { migrations: { directory: './migrations' } };\n"],
      ['migrations/20240305_search.js', "exports.up = async (knex) => {\n  if (knex.client.config.client === 'pg' && process.env.COOP_SEARCH) {\n    await knex.schema.createTable('search', (t) => { t.increments('id'); });\n  }\n};\nexports.down = () => {};\n"],
    ]);
    const r = await replayTree(noClient, {});
    expect(r.diagnostics.filter((d) => d.code === 'knex/condition-unknown').map((d) => d.message.replace(/^.*\(to decide it, say what it reads: (.*)\)$/, '$1'))).toEqual([
      '--knex-client CLIENT, --knex-assume process.env.COOP_SEARCH=VALUE',
    ]);
  });

  it('a malformed value is an error diagnostic, and the run goes on', async () => {
    const r = await replayTree(tree, { 'knex-environment': 'development', 'knex-assume': ['COOP.settings', 'process.env.COOP_SITE=north'] });
    const bad = r.diagnostics.filter((d) => d.code === 'knex/bad-assume-option');
    expect(bad.map((d) => [d.severity, d.message])).toEqual([['error', expect.stringContaining('--knex-assume COOP.settings: expected NAME=VALUE')]]);
    const tables = tablesOf(r.steps[r.steps.length - 1]!.snapshot);
    expect(tables.map((t) => t.name).sort()).toEqual(['deposits', 'notes_north', 'tools']);
  });

  it('the knexfile is read with them too: its client and its migration directory', async () => {
    const fromEnv = new Map([
      ['knexfile.js', "module.exports = {\n  client: process.env.COOP_CLIENT,\n  useNullAsDefault: true,\n  migrations: { directory: process.env.COOP_STEPS },\n};\n"],
      [
        'db/steps/20240306_shelves.js',
        "exports.up = async (knex) => {\n  await knex.schema.createTable('shelves', (t) => {\n    t.increments('id');\n    t.string('aisle', 8).notNullable();\n    if (knex.client.config.client === 'better-sqlite3') t.text('sqlite_note');\n    else t.jsonb('notes');\n  });\n};\nexports.down = () => {};\n",
      ],
    ]);
    process.env['COOP_CLIENT'] = 'better-sqlite3';
    process.env['COOP_STEPS'] = './db/steps';
    // (the oracle's Knex is made for better-sqlite3, whose config.client is that name)
    const oracle = await runKnex(fromEnv, { engine: 'sqlite', environment: 'production', each: true });
    const r = await replayTree(fromEnv, { 'knex-assume': ['process.env.COOP_CLIENT=better-sqlite3', 'process.env.COOP_STEPS=./db/steps'] });
    expect(r.diagnostics).toEqual([]);
    const steps = r.steps.filter((x) => x.role === 'migration');
    expect(steps.map((x) => name(x.path))).toEqual(oracle.migrations);
    expect(fromReplay(tablesOf(steps[0]!.snapshot), 'sqlite')).toEqual(fromDatabase(oracle.after[0]!.tables, 'sqlite'));
    expect(fromDatabase(oracle.final, 'sqlite')['shelves']!.columns).toEqual(['id', 'aisle', 'sqlite_note']);
    // SQLite's types (the client's family), where PostgreSQL's are the default
    expect(tablesOf(steps[0]!.snapshot)[0]!.columns.find((c) => c.name === 'sqlite_note')!.nativeType).toBe('text');
    // without them: no directory, so no migrations
    const none = await replayTree(fromEnv, {});
    expect(none.steps.filter((x) => x.role === 'migration')).toEqual([]);
    // and with the directory alone, the client is not known: PostgreSQL's types, the first branch, and the notes
    const dirOnly = await replayTree(fromEnv, { 'knex-assume': ['process.env.COOP_STEPS=./db/steps'] });
    expect(dirOnly.diagnostics.map((d) => d.code)).toEqual(['knex/knexfile', 'knex/condition-unknown']);
    expect(dirOnly.diagnostics[1]!.message).toContain('--knex-client CLIENT');
    // a condition in the knexfile is decided by them as well (else its first branch is taken)
    const chosen = new Map(fromEnv);
    chosen.set('knexfile.js', "module.exports = {\n  client: process.env.COOP_LITE === 'yes' ? 'better-sqlite3' : 'pg',\n  useNullAsDefault: true,\n  migrations: { directory: './db/steps' },\n};\n");
    const lite = await replayTree(chosen, { 'knex-assume': ['process.env.COOP_LITE=yes'] });
    expect(lite.diagnostics).toEqual([]);
    expect(tablesOf(lite.steps[0]!.snapshot)[0]!.columns.map((c) => c.name)).toEqual(['id', 'aisle', 'sqlite_note']);
    const pg = await replayTree(chosen, { 'knex-assume': ['process.env.COOP_LITE=no'] });
    expect(tablesOf(pg.steps[0]!.snapshot)[0]!.columns.map((c) => c.name)).toEqual(['id', 'aisle', 'notes']);
    const first = await replayTree(chosen, {});
    expect(tablesOf(first.steps[0]!.snapshot)[0]!.columns.map((c) => c.name)).toEqual(['id', 'aisle', 'sqlite_note']);
  });
});
