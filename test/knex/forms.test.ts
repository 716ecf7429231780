// The ways a Knex migration can be written, each checked against Knex itself: every case is a
// tiny project (a knexfile and its migrations) that Knex runs on SQLite (better-sqlite3) and the
// adapter replays; the two schemas must agree. Module forms (CommonJS, ESM, functions, arrows,
// methods), receivers of the builder, names from constants and imports, loops, conditions,
// chains over statements, helpers, and builders that are never awaited (Knex never runs them).
import { describe, expect, it } from 'vitest';
import type { KnexFacts } from '@schema-strata/adapter-knex';
import { replaySteps, replayTree, tablesOf } from './fixture.js';
import { runKnex } from './oracle.js';
import { fromDatabase, fromReplay } from './compare.js';

const KNEXFILE = "module.exports = { client: 'better-sqlite3', useNullAsDefault: true, migrations: { directory: './migrations', loadExtensions: ['.js', '.ts', '.mjs', '.cjs'] } };\n";

const members = "t.increments('id');\n    t.string('name', 80).notNullable();";

const LOOP_OF_DATA =
  "exports.up = async (knex) => {\n  await knex.schema.createTable('tools', (t) => {\n    t.increments('id');\n    t.integer('loans_count').notNullable().defaultTo(0);\n  });\n  let round = 0;\n  while (round < 2) {\n    round++;\n    await knex.transaction(async (trx) => {\n      for (const row of await trx('tools').select('id')) await trx('tools').where('id', row.id).increment('loans_count', 1);\n    });\n  }\n};\nexports.down = () => {};\n";

interface Case {
  name: string;
  files: Record<string, string>;
  /** Diagnostic codes the replay must report. */
  codes?: string[];
}

const CASES: Case[] = [
  { name: 'exports.up = function', files: { 'migrations/001.js': `exports.up = function (knex) {\n  return knex.schema.createTable('members', function (t) {\n    ${members}\n  });\n};\nexports.down = function () {};\n` } },
  { name: 'exports.up = arrow with an expression body', files: { 'migrations/001.js': `exports.up = (knex) => knex.schema.createTable('members', (t) => {\n    ${members}\n  });\nexports.down = () => {};\n` } },
  { name: 'module.exports = { up() {} } (method)', files: { 'migrations/001.cjs': `module.exports = {\n  up(knex) {\n    return knex.schema.createTable('members', (t) => {\n    ${members}\n    });\n  },\n  down() {},\n};\n` } },
  { name: 'module.exports = { up, down } (shorthand of local functions)', files: { 'migrations/001.js': `async function up(knex) {\n  await knex.schema.createTable('members', (t) => {\n    ${members}\n  });\n}\nconst down = async () => {};\nmodule.exports = { up, down };\n` } },
  { name: 'module.exports.up and a hoisted function', files: { 'migrations/001.js': `module.exports.up = up;\nmodule.exports.down = () => {};\nfunction up(knex) {\n  return knex.schema.createTable('members', (t) => {\n    ${members}\n  });\n}\n` } },
  { name: 'export async function up (TypeScript)', files: { 'migrations/001.ts': `import type { Knex } from 'knex';\nexport async function up(knex: Knex): Promise<void> {\n  await knex.schema.createTable('members', (t: Knex.CreateTableBuilder) => {\n    ${members}\n  });\n}\nexport async function down(): Promise<void> {}\n` } },
  { name: 'export const up = arrow (ESM .mjs)', files: { 'migrations/001.mjs': `export const up = async (knex) => {\n  await knex.schema.createTable('members', (t) => {\n    ${members}\n  });\n};\nexport const down = async () => {};\n` } },
  { name: 'export = { up, down } (TypeScript for module.exports)', files: { 'migrations/001.ts': `const up = async (knex: any) => {\n  await knex.schema.createTable('members', (t: any) => {\n    ${members}\n  });\n};\nconst down = async () => {};\nexport = { up, down };\n` } },
  { name: 'export { up, down }', files: { 'migrations/001.ts': `const up = (knex: any) => knex.schema.createTable('members', (t: any) => {\n    ${members}\n  });\nfunction down() {}\nexport { up, down };\n` } },
  {
    name: 'receivers: an alias of knex, a destructured schema, a transaction, withSchema of the default schema',
    files: {
      'migrations/001.js': `exports.up = async (knex) => {\n  const db = knex;\n  const { schema } = knex;\n  const s = knex.schema;\n  await db.schema.createTable('a', (t) => { t.increments('id'); });\n  await schema.createTable('b', (t) => { t.increments('id'); });\n  await s.createTable('c', (t) => { t.increments('id'); });\n  await knex.transaction(async (trx) => {\n    await trx.schema.createTable('d', (t) => { t.increments('id'); });\n  });\n  await knex.schema.withSchema('main').createTable('e', (t) => { t.increments('id'); });\n};\nexports.down = () => {};\n`,
    },
  },
  {
    name: 'calls chained on one builder and spread over statements',
    files: {
      'migrations/001.js': `exports.up = async (knex) => {\n  await knex.schema.createTable('a', (t) => { t.increments('id'); }).createTable('b', (t) => {\n    t.increments('id');\n    const col = t.integer('a_id');\n    col.unsigned();\n    col.notNullable().references('id').inTable('a');\n  });\n};\nexports.down = () => {};\n`,
    },
  },
  {
    name: 'names from constants, templates, object members, an imported constant and loops over literal arrays',
    files: {
      'names.js': "module.exports = { TABLES: { tools: 'tools' }, PREFIX: 'coop' };\n",
      'migrations/001.js': `const { TABLES, PREFIX } = require('../names');\nconst KINDS = ['hand', 'power'];\nconst FLAGS = { lent: 'boolean', broken: 'boolean' };\nexports.up = async (knex) => {\n  await knex.schema.createTable(TABLES.tools, (t) => {\n    t.increments('id');\n    for (const k of KINDS) t.string(\`\${k}_code\`, 10);\n    KINDS.forEach((k) => t.integer(k + '_count'));\n    for (const [name, type] of Object.entries(FLAGS)) t[type](name);\n  });\n  await Promise.all(['email', 'sms'].map((c) => knex.schema.createTable(\`\${PREFIX}_\${c}\`, (t) => { t.increments('id'); })));\n};\nexports.down = () => {};\n`,
    },
  },
  {
    name: 'hasTable and hasColumn conditions, in if statements and in then callbacks',
    files: {
      'migrations/001.js': `exports.up = async (knex) => {\n  await knex.schema.createTable('a', (t) => { t.increments('id'); });\n  if (!(await knex.schema.hasTable('a'))) {\n    await knex.schema.createTable('never', (t) => { t.increments('id'); });\n  } else {\n    await knex.schema.alterTable('a', (t) => { t.string('x'); });\n  }\n  const hasY = await knex.schema.hasColumn('a', 'y');\n  if (!hasY) await knex.schema.alterTable('a', (t) => { t.string('y'); });\n  await knex.schema.hasTable('b').then((exists) => {\n    if (!exists) return knex.schema.createTable('b', (t) => { t.increments('id'); });\n  });\n  await (knex.schema.hasColumn('a', 'x').then((x) => x && knex.schema.alterTable('a', (t) => { t.string('z'); })));\n};\nexports.down = () => {};\n`,
    },
  },
  {
    name: 'helpers: a local function, an imported function, this in a function callback',
    files: {
      'helpers.js': "exports.addStamp = function (t, knex) {\n  t.datetime('stamped_at').notNullable().defaultTo(knex.fn.now());\n};\n",
      'migrations/001.ts': `import { addStamp } from '../helpers';\nfunction addOwner(t: any) {\n  t.integer('owner_id').unsigned();\n}\nexport async function up(knex: any) {\n  await knex.schema.createTable('kits', function (this: any) {\n    this.increments('id');\n    addOwner(this);\n    addStamp(this, knex);\n  });\n}\nexport async function down() {}\n`,
    },
  },
  {
    name: 'a builder that is neither awaited nor returned never runs',
    files: {
      'migrations/001.js': `exports.up = async function (knex) {\n  knex.schema.createTable('forgotten', (t) => { t.increments('id'); });\n  await knex.schema.createTable('kept', (t) => { t.increments('id'); });\n};\nexports.down = () => {};\n`,
    },
    codes: ['knex/not-awaited'],
  },
  {
    name: 'table helpers of a models module, passed on by a spread of require() (a pattern seen in a real Knex application)',
    files: {
      'models/tool.model.js': "async function createToolTable(knex) {\n  if (!(await knex.schema.hasTable('tools'))) {\n    await knex.schema.createTable('tools', (t) => { t.increments('id'); t.string('name').notNullable(); });\n  }\n  const hasShelf = await knex.schema.hasColumn('tools', 'shelf');\n  if (!hasShelf) await knex.schema.alterTable('tools', (t) => { t.string('shelf', 10); });\n}\nmodule.exports = { createToolTable };\n",
      'models/loan.model.js': "exports.createLoanTable = async (knex) => {\n  await knex.schema.createTable('loans', (t) => {\n    t.increments('id');\n    t.integer('tool_id').references('id').inTable('tools').notNullable().onDelete('CASCADE');\n  });\n};\n",
      'models/index.js': "module.exports = {\n  ...require('./tool.model'),\n  ...require('./loan.model'),\n};\n",
      'migrations/001_models.js': "const models = require('../models');\nasync function up(knex) {\n  await models.createToolTable(knex);\n  await models.createLoanTable(knex);\n}\nmodule.exports = { up, down: async () => {} };\n",
    },
  },
  {
    name: 'early return and a switch on a known value',
    files: {
      'migrations/001.js': "exports.up = (knex) => knex.schema.createTable('a', (t) => { t.increments('id'); });\nexports.down = () => {};\n",
      'migrations/002.js': "const DB = 'sqlite';\nexports.up = async (knex) => {\n  await knex.schema.alterTable('a', (t) => {\n    switch (DB) {\n      case 'pg':\n        t.specificType('body', 'tsvector');\n        break;\n      case 'sqlite':\n      case 'mysql':\n        t.text('body');\n        break;\n      default:\n        t.string('body');\n    }\n  });\n  if (await knex.schema.hasTable('a')) return;\n  await knex.schema.createTable('never', (t) => { t.increments('id'); });\n};\nexports.down = () => {};\n",
    },
  },
  {
    // older Knex passed a Promise library as the second argument; Knex 3 passes none, hence the default
    name: 'older style: up(knex, Promise) returning Promise.all of builders',
    files: {
      'migrations/001.js': "exports.up = function (knex, Promise = globalThis.Promise) {\n  return Promise.all([\n    knex.schema.createTable('a', function (t) { t.increments(); }),\n    knex.schema.createTable('b', function (t) { t.increments(); t.string('label'); }),\n  ]);\n};\nexports.down = function (knex, Promise) { return Promise.resolve(); };\n",
    },
  },
  {
    name: 'several migrations in file-name order, across JS and TS',
    files: {
      'migrations/20240102_b.ts': "export async function up(knex: any) { await knex.schema.alterTable('a', (t: any) => { t.renameColumn('x', 'y'); }); }\nexport async function down() {}\n",
      'migrations/20240101_a.js': "exports.up = (knex) => knex.schema.createTable('a', (t) => { t.increments('id'); t.string('x'); });\nexports.down = () => {};\n",
      'migrations/20240103_c.mjs': "export const up = (knex) => knex.schema.renameTable('a', 'aa');\nexport const down = () => {};\n",
    },
  },
  {
    name: 'renameColumn: the foreign keys of other tables that point at the column follow it',
    files: {
      'migrations/001.js': `exports.up = async (knex) => {\n  await knex.schema.createTable('members', (t) => { t.increments('id'); t.string('email').unique(); });\n  await knex.schema.createTable('loans', (t) => { t.increments('id'); t.string('member_email').references('email').inTable('members'); });\n  await knex.schema.createTable('notes', (t) => { t.increments('id'); t.integer('member_id').references('id').inTable('members'); });\n};\nexports.down = () => {};\n`,
      'migrations/002.js': `exports.up = (knex) => knex.schema.alterTable('members', (t) => { t.renameColumn('email', 'mail'); });\nexports.down = () => {};\n`,
    },
  },
  {
    // a knex instance held by an object of a package (an ORM's handle, say), read in a helper that takes no parameter
    name: 'a receiver read from a member of a package object',
    files: {
      'migrations/001.js': "const hub = require('node:process');\nexports.up = async (knex) => {\n  hub.coopKnex = knex;\n  await createShelves();\n};\nasync function createShelves() {\n  const db = hub.coopKnex;\n  await db.schema.createTable('shelves', (t) => {\n    t.increments('id');\n    t.string('aisle', 8).notNullable();\n  });\n}\nexports.down = () => {};\n",
    },
  },
  {
    name: 'a while loop that only moves data, in a transaction',
    files: { 'migrations/001.js': LOOP_OF_DATA },
    codes: [],
  },
  {
    // a pattern of a real application: column names kept in enums, imported through a barrel
    name: "names and values from TypeScript enums of the project (string, numeric with TypeScript's reverse mapping, const)",
    files: {
      'src/fields/tool.ts': "export enum FieldNameTool {\n  id = 'id',\n  label = 'tool_label',\n  kind = 'kind',\n}\nexport const TableTool = 'tools';\nexport enum ToolKind {\n  Drill = 'drill',\n  Saw = 'saw',\n}\nexport enum Shelf {\n  Top,\n  Middle = 5,\n  Bottom,\n}\nexport const enum Size {\n  Small = 's',\n}\n",
      'src/fields/index.ts': "export { FieldNameTool, TableTool, ToolKind, Shelf, Size } from './tool';\n",
      'migrations/001.ts': "import { FieldNameTool, Shelf, Size, TableTool, ToolKind } from '../src/fields';\n\nenum Local {\n  Note = 'note',\n}\n\nexport async function up(knex: any): Promise<void> {\n  await knex.schema.createTable(TableTool, (t: any) => {\n    t.increments(FieldNameTool.id);\n    t.string(FieldNameTool.label).notNullable();\n    t.enu(FieldNameTool.kind, Object.values(ToolKind));\n    t.integer('shelf_' + Shelf.Bottom);\n    for (const s of Object.keys(Shelf)) t.boolean(`on_${s}`);\n    t.string(Local.Note);\n    t.string(`size_${Size.Small}`);\n  });\n}\nexport async function down(): Promise<void> {}\n",
    },
    codes: [],
  },
];

describe('ways of writing a Knex migration (oracle: Knex 3 on better-sqlite3)', () => {
  for (const c of CASES) {
    it(c.name, async () => {
      const tree = new Map<string, string>([['knexfile.js', KNEXFILE], ...Object.entries(c.files)]);
      const oracle = await runKnex(tree, { engine: 'sqlite', environment: 'development' });
      const steps = await replaySteps(tree, { 'knex-client': 'sqlite' });
      const migrations = steps.filter((s) => s.role === 'migration');
      expect(migrations.map((s) => s.path.slice(s.path.lastIndexOf('/') + 1))).toEqual(oracle.migrations);
      const last = migrations[migrations.length - 1]!.snapshot;
      expect(fromReplay(tablesOf(last), 'sqlite')).toEqual(fromDatabase(oracle.final, 'sqlite'));
      expect(oracle.final.length).toBeGreaterThan(0);
      if (c.codes?.length === 0) expect((await replayTree(tree, { 'knex-client': 'sqlite' })).diagnostics).toEqual([]);
    });
  }

  it('export default { up, down } is no migration for Knex, nor for the replay', async () => {
    const text = "const up = async (knex) => knex.schema.createTable('a', (t) => { t.increments('id'); });\nconst down = async () => {};\nexport default { up, down };\n";
    const tree = new Map([['knexfile.js', KNEXFILE], ['migrations/001.mjs', text]]);
    await expect(runKnex(tree, { engine: 'sqlite', environment: 'development' })).rejects.toThrow(/must have both an up and down function/);
    const { KnexSession, knexOptions, parseKnexSource } = await import('@schema-strata/adapter-knex');
    const files = [...tree.keys()].sort().map((path) => ({ path, blob: path, facts: (parseKnexSource(tree.get(path)!) as { facts: KnexFacts }).facts }));
    const r = new KnexSession(knexOptions({})).assemble({ files, missing: [] });
    expect('snapshot' in r && r.snapshot.tables).toEqual([]);
    expect(r.diagnostics.map((d) => d.code)).toContain('knex/no-up');
    // the message says where the up() is, and why Knex does not take it
    expect(r.diagnostics.find((d) => d.code === 'knex/no-up')!.message).toMatch(/the default export holds one, but Knex takes up\(\) from the module itself/);
    // a module with no up() at all is told apart (Knex refuses it too)
    const bare = [['knexfile.js', KNEXFILE], ['migrations/001.mjs', 'export const down = async () => {};\n']] as const;
    await expect(runKnex(new Map(bare), { engine: 'sqlite', environment: 'development' })).rejects.toThrow(/must have both an up and down function/);
    const b = new KnexSession(knexOptions({})).assemble({ files: bare.map(([path, t]) => ({ path, blob: path, facts: (parseKnexSource(t) as { facts: KnexFacts }).facts })), missing: [] });
    expect(b.diagnostics.find((d) => d.code === 'knex/no-up')!.message).toBe('no up() function is exported: Knex would refuse this migration; it is left out');
  });

  it('reports what it leaves out', async () => {
    const c = CASES.find((x) => x.codes)!;
    const tree = new Map<string, string>([['knexfile.js', KNEXFILE], ...Object.entries(c.files)]);
    const { KnexSession, knexOptions, parseKnexSource } = await import('@schema-strata/adapter-knex');
    const files = [...tree.keys()].sort().map((path) => ({ path, blob: path, facts: (parseKnexSource(tree.get(path)!) as { facts: KnexFacts }).facts }));
    const r = new KnexSession(knexOptions({})).assemble({ files, missing: [] });
    expect('diagnostics' in r && r.diagnostics.map((d) => `${d.code}@${d.line}`)).toEqual(['knex/not-awaited@2']);
  });

  it('reports a for, while or do loop it does not replay only when the loop may change the schema', async () => {
    const { KnexSession, knexOptions, parseKnexSource } = await import('@schema-strata/adapter-knex');
    const codes = (text: string): string[] => {
      const facts = (parseKnexSource(text) as { facts: KnexFacts }).facts;
      const r = new KnexSession(knexOptions({})).assemble({ files: [{ path: 'migrations/001.js', blob: 'b', facts }], missing: [] });
      return 'diagnostics' in r ? r.diagnostics.map((d) => `${d.code}@${d.line}`) : [];
    };
    expect(codes(LOOP_OF_DATA)).toEqual([]);
    // the same loop with a schema call in its transaction: Knex would run it, the replay does not
    const withSchema = LOOP_OF_DATA.replace("await trx('tools').where", "await trx.schema.alterTable('tools', (t) => { t.string('shelf'); });\n      await trx('tools').where");
    expect(codes(withSchema)).toEqual(['knex/not-followed@7']);
    expect(codes(withSchema.replace('while (round < 2)', 'do').replace(/\n  }\n};/, '\n  } while (round < 2);\n};'))).toEqual(['knex/not-followed@7']);
  });
});
