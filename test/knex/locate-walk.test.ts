// The Knex locate step carries the last commit's migrations forward during the history walk
// (TreeView.walk) when a commit only adds or edits plain migrations. Checked against locating
// every commit afresh (the same adapter, given views without the walk): the same files at every
// version and the same interchange file, over a history that also edits the knexfile, adds a
// migration that imports a helper, deletes one, adds a second migration directory and an init file.
import { afterAll, describe, expect, it } from 'vitest';
import { extractHistory, serialiseDocument, toDocument, type SchemaAdapter, type ScriptedCommit } from '@schema-strata/core';
import knexAdapter from '@schema-strata/adapter-knex';
import { day, makeRepo, tempDir } from '../helpers/repo.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

const mig = (body: string) => `exports.up = async (knex) => { ${body} };\nexports.down = async () => {};\n`;
const create = (t: string, extra = '') => mig(`await knex.schema.createTable('${t}', (t) => { t.increments('id'); t.string('label', 40);${extra} });`);
const knexfile = (dirs: string[]) => `module.exports = { client: 'pg', migrations: { directory: ${JSON.stringify(dirs)} } };\n`;

const steps: Array<{ files: ScriptedCommit['files'] }> = [
  { files: { 'package.json': '{ "dependencies": { "knex": "^3.1.0" } }\n', 'knexfile.js': knexfile(['./db/migrations']), 'db/migrations/001_tools.js': create('tools') } },
  { files: { 'db/migrations/002_members.js': create('members'), 'src/app.ts': 'export const app = 1;\n' } },
  { files: { 'db/migrations/001_tools.js': create('tools', " t.text('note');") } },
  { files: { 'db/migrations/sub/not_a_migration.js': create('nope'), 'db/migrations/types.d.ts': 'export type X = 1;\n' } },
  { files: { 'db/migrations/004_repairs.js': create('repairs') } },
  { files: { 'db/migrations/002_members.js': null } },
  { files: { 'db/migrations/005_shelves.js': create('shelves') } },
  { files: { 'knexfile.js': knexfile(['./db/migrations', './db/more']) } },
  { files: { 'db/more/006_badges.js': create('badges') } },
  { files: { 'db/base.js': "exports.up = async (knex) => { await knex.schema.createTable('settings', (t) => { t.string('key').primary(); }); };\n" } },
  { files: { 'db/migrations/007_kits.js': create('kits') } },
  { files: { 'db/migrations/003_loans.js': "const { cols } = require('../helpers/cols');\n" + mig("await knex.schema.createTable('loans', (t) => { t.increments('id'); cols(t); });") } },
  { files: { 'db/helpers/cols.js': "exports.cols = (t) => { t.integer('tool_id'); };\n" } },
  { files: { 'db/more/008_slots.js': create('slots'), 'src/app.ts': 'export const app = 2;\n' } },
];
const commits: ScriptedCommit[] = steps.map((c, i) => ({ date: day(i * 3), message: `step ${i}`, ...c }));

/** The Knex adapter with every locate call given a view without the walk: each commit located afresh. */
const afresh: SchemaAdapter = {
  ...knexAdapter,
  locate: (tree, req) => {
    const { walk: _walk, ...view } = tree as typeof tree & { walk?: unknown };
    return knexAdapter.locate(view as typeof tree, req);
  },
};

describe('the Knex locate step during the walk', () => {
  it('finds at every commit the files that locating afresh finds', async () => {
    const repo = await makeRepo(tmp.dir, 'walk', commits);
    const adapterOptions = { 'knex-init': ['db/base.js'] };
    const carried = await extractHistory({ repo, adapter: knexAdapter, adapterOptions });
    const fresh = await extractHistory({ repo, adapter: afresh, adapterOptions });
    expect(carried.versions.map((v) => v.files.map((f) => f.path))).toEqual(fresh.versions.map((v) => v.files.map((f) => f.path)));
    const doc = (h: typeof carried) => serialiseDocument(toDocument(h, { name: 'test', version: '0' }));
    expect(doc(carried)).toBe(doc(fresh));
    // the history exercises what it should: the helper joins, the second directory and the init file count
    const last = carried.versions[carried.versions.length - 1]!.files.map((f) => f.path);
    expect(last).toEqual(expect.arrayContaining(['db/helpers/cols.js', 'db/more/008_slots.js', 'db/base.js', 'knexfile.js']));
    expect(last).not.toContain('db/migrations/002_members.js');
    expect(last).not.toContain('db/migrations/sub/not_a_migration.js');
  });
});
