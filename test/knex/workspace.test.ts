// Migrations that take their table and column names from a package of the repository itself (a
// workspace package: `require('@coop/names')`, whose package.json says its entry is compiled
// output that is not committed). Against Knex itself: Knex 3 runs the same migrations on SQLite
// (better-sqlite3), the package installed as a package manager links a workspace package
// (node_modules/@coop/names -> packages/names) and built as `tsc` would (src -> dist/cjs), so
// that Node loads it by its package.json's `main`; the database is introspected after every
// migration. Then a history: an edit of the package changes the replay of the migrations that
// read it, and a package that is not the repository's keeps its names unknown.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { extractHistory, snapshotOfVersion, toDocument, writeRepository } from '@schema-strata/core';
import knexAdapter from '@schema-strata/adapter-knex';
import { replayTree, tablesOf } from './fixture.js';
import { runKnex } from './oracle.js';
import { fromDatabase, fromReplay } from './compare.js';

const NAMES_PACKAGE = '{\n  "name": "@coop/names",\n  "private": true,\n  "main": "dist/cjs/entry.js",\n  "types": "dist/cjs/entry.d.ts"\n}\n';
const TABLES = [
  "export const TableTool = 'tool';",
  "export const TableLoan = 'loan';",
  'export enum ToolField {',
  "  id = 'id',",
  "  label = 'label',",
  "  shelf = 'shelf_code',",
  '}',
  "export const LoanField = { id: 'id', tool: 'tool_id', member: 'member_name' } as const;",
  '',
].join('\n');

const tree = new Map<string, string>([
  ['package.json', '{\n  "name": "tool-coop",\n  "private": true,\n  "workspaces": ["packages/*"]\n}\n'],
  ['knexfile.js', "module.exports = {\n  development: { client: 'better-sqlite3', migrations: { directory: './db/migrations' } },\n};\n"],
  ['packages/names/package.json', NAMES_PACKAGE],
  ['packages/names/src/entry.ts', "export * from './tables.js';\n"],
  ['packages/names/src/tables.ts', TABLES],
  [
    'db/migrations/20240301_tools.js',
    [
      "const { TableTool, ToolField } = require('@coop/names');",
      'exports.up = async (knex) => {',
      '  await knex.schema.createTable(TableTool, (t) => {',
      '    t.increments(ToolField.id);',
      '    t.string(ToolField.label).notNullable().unique();',
      '    t.string(ToolField.shelf);',
      '  });',
      '};',
      'exports.down = () => {};',
      '',
    ].join('\n'),
  ],
  [
    'db/migrations/20240302_loans.ts',
    [
      "import type { Knex } from 'knex';",
      "import * as names from '@coop/names';",
      "import { LoanField } from '@coop/names';",
      'export async function up(knex: Knex): Promise<void> {',
      '  await knex.schema.createTable(names.TableLoan, (t) => {',
      '    t.increments(LoanField.id);',
      '    t.integer(LoanField.tool).notNullable().references(names.ToolField.id).inTable(names.TableTool);',
      '    t.string(LoanField.member);',
      '  });',
      '}',
      'export async function down(): Promise<void> {}',
      '',
    ].join('\n'),
  ],
]);

const name = (p: string): string => p.slice(p.lastIndexOf('/') + 1);

describe('a workspace package of names (oracle: Knex 3 on better-sqlite3, the package linked and built)', () => {
  it('replays each migration as Knex runs it', async () => {
    const oracle = await runKnex(tree, { engine: 'sqlite', environment: 'development', each: true, packages: [{ name: '@coop/names', dir: 'packages/names', build: 'dist/cjs' }] });
    const r = await replayTree(tree, { 'knex-environment': 'development' });
    const steps = r.steps.filter((x) => x.role === 'migration');
    expect(steps.map((x) => name(x.path))).toEqual(oracle.migrations);
    expect(oracle.migrations.length).toBe(2);
    steps.forEach((x, i) => {
      expect(fromReplay(tablesOf(x.snapshot), 'sqlite'), `after ${oracle.migrations[i]}`).toEqual(fromDatabase(oracle.after[i]!.tables, 'sqlite'));
    });
    expect(r.diagnostics).toEqual([]);
    // (a check that the comparison saw the package's names)
    expect(Object.keys(fromDatabase(oracle.final, 'sqlite')).sort()).toEqual(['loan', 'tool']);
    expect(fromDatabase(oracle.final, 'sqlite')['tool']!.columns).toEqual(['id', 'label', 'shelf_code']);
  });

  it('functions of a workspace package that are handed a builder are followed, as Knex runs them', async () => {
    const helpers = new Map(tree);
    helpers.set('packages/helpers/package.json', '{\n  "name": "@coop/helpers",\n  "main": "dist/index.js"\n}\n');
    helpers.set('packages/helpers/src/index.ts', [
      'export function stamps(t: any): void {',
      '  t.timestamps(true, true);',
      '}',
      'export const withId = (knex: any, name: string) => knex.schema.createTable(name, (t: any) => {',
      "  t.increments('id');",
      '  stamps(t);',
      '});',
      '',
    ].join('\n'));
    helpers.set('db/migrations/20240303_shelves.js', [
      "const { withId } = require('@coop/helpers');",
      "const h = require('@coop/helpers');",
      'exports.up = async (knex) => {',
      "  await withId(knex, 'shelf');",
      "  await knex.schema.createTable('bin', (t) => {",
      "    t.increments('id');",
      '    h.stamps(t);',
      '  });',
      '};',
      'exports.down = () => {};',
      '',
    ].join('\n'));
    const oracle = await runKnex(helpers, {
      engine: 'sqlite', environment: 'development', each: true,
      packages: [{ name: '@coop/names', dir: 'packages/names', build: 'dist/cjs' }, { name: '@coop/helpers', dir: 'packages/helpers', build: 'dist' }],
    });
    const r = await replayTree(helpers, { 'knex-environment': 'development' });
    const steps = r.steps.filter((x) => x.role === 'migration');
    expect(steps.map((x) => name(x.path))).toEqual(oracle.migrations);
    steps.forEach((x, i) => {
      expect(fromReplay(tablesOf(x.snapshot), 'sqlite'), `after ${oracle.migrations[i]}`).toEqual(fromDatabase(oracle.after[i]!.tables, 'sqlite'));
    });
    expect(r.diagnostics).toEqual([]);
    expect(fromDatabase(oracle.final, 'sqlite')['bin']!.columns).toEqual(['id', 'created_at', 'updated_at']);
    // a name the workspace package does not export: its code is in the repository, but no function of it is there
    helpers.set('db/migrations/20240304_racks.js', "const h = require('@coop/helpers');\nexports.up = async (knex) => {\n  await knex.schema.createTable('rack', (t) => {\n    h.rackColumns(t);\n  });\n};\n");
    const missing = await replayTree(helpers, { 'knex-environment': 'development' });
    expect(missing.diagnostics.map((d) => d.message)).toEqual([
      "rackColumns from '@coop/helpers' is given a Knex builder but is not a function of the project that could be read; its effects are left out",
    ]);
  });

  it('without an entry in the package.json: src/index; a subpath under src/', async () => {
    const subpath = new Map(tree);
    subpath.set('db/migrations/20240303_repairs.js', "const { TableTool } = require('@coop/names/tables');\nexports.up = async (knex) => {\n  await knex.schema.alterTable(TableTool, (t) => {\n    t.integer('repairs');\n  });\n};\n");
    // a package.json that names no entry at all
    subpath.set('packages/names/package.json', '{ "name": "@coop/names" }\n');
    subpath.delete('packages/names/src/entry.ts');
    subpath.set('packages/names/src/index.ts', "export * from './tables.js';\n");
    const located = await knexAdapter.locate(viewOf(subpath), { options: {} });
    expect(located.files).toEqual(expect.arrayContaining(['packages/names/src/index.ts', 'packages/names/src/tables.ts']));
    expect(located.consulted).toEqual(['packages/names/package.json']);
    const r = await replayTree(subpath, { 'knex-environment': 'development' });
    const tables = tablesOf(r.steps[r.steps.length - 1]!.snapshot);
    expect(tables.find((t) => t.name === 'tool')!.columns.map((c) => c.name)).toEqual(['id', 'label', 'shelf_code', 'repairs']);
  });

  it('a package that is not the repository\'s: its names are read as before, so --knex-assume gives them values', async () => {
    const other = new Map([
      ['knexfile.js', tree.get('knexfile.js')!],
      ['db/migrations/20240301_tools.js', "const { site } = require('coop-settings');\nexports.up = async (knex) => {\n  await knex.schema.createTable('tool', (t) => {\n    t.increments('id');\n    if (site.region === 'north') t.string('shed');\n    else t.string('aisle');\n  });\n};\n"],
    ]);
    // and a knex instance taken from such a package (`R.knex`) is a builder, as any value not known statically
    other.set('db/migrations/20240302_loans.js', "const { R, addStamps } = require('orm-bridge');\nexports.up = async () => {\n  const knex = R.knex;\n  await knex.schema.createTable('loan', (t) => {\n    t.increments('id');\n    addStamps(t);\n  });\n};\n");
    const r = await replayTree(other, { 'knex-environment': 'development', 'knex-assume': ['site.region=north'] });
    // (a function of such a package is not followed: its code is not in the repository)
    expect(r.diagnostics.map((d) => [d.code, d.message])).toEqual([
      ['knex/call-not-followed', 'addStamps(...) is given a Knex builder but its code is not in the project; its effects are left out'],
    ]);
    const tables = tablesOf(r.steps[r.steps.length - 1]!.snapshot);
    expect(tables.map((t) => t.name)).toEqual(['tool', 'loan']);
    expect(tables[0]!.columns.map((c) => c.name)).toEqual(['id', 'shed']);
  });

  it('in a history: an edit of the package changes the tables; a package not of the repository keeps its names unknown', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'strata-knex-workspace-'));
    const files = (m: Map<string, string>): Record<string, string> => Object.fromEntries(m);
    const renamed = TABLES.replace("shelf = 'shelf_code'", "shelf = 'shelf_label'");
    await writeRepository(dir, [
      { date: '2024-03-01T10:00:00+00:00', message: 'Tools and loans', files: files(tree) },
      { date: '2024-03-02T10:00:00+00:00', message: 'Rename the shelf column in the names package', files: { 'packages/names/src/tables.ts': renamed } },
      { date: '2024-03-03T10:00:00+00:00', message: 'Bump the package version', files: { 'packages/names/package.json': NAMES_PACKAGE.replace('"private": true,', '"private": true,\n  "version": "1.0.1",') } },
      // the package renamed: the migrations name a package the repository no longer has
      { date: '2024-03-04T10:00:00+00:00', message: 'Rename the package', files: { 'packages/names/package.json': NAMES_PACKAGE.replace('@coop/names', '@coop/labels') } },
    ]);
    const doc = toDocument(await extractHistory({ repo: dir, adapter: knexAdapter, adapterOptions: { 'knex-environment': 'development' } }), { name: 'test', version: '0' });
    const cols = (i: number): string[] | undefined => snapshotOfVersion(doc, i)!.tables.find((t) => t.name === 'tool')?.columns.map((c) => c.name);
    // (a package.json is consulted: the version bump, which changes no file of the schema, makes no version)
    expect(doc.versions.map((v) => [v.subject, v.status])).toEqual([
      ['Tools and loans', 'ok'],
      ['Rename the shelf column in the names package', 'ok'],
      ['Rename the package', 'ok'],
    ]);
    expect(cols(0)).toEqual(['id', 'label', 'shelf_code']);
    expect(cols(1)).toEqual(['id', 'label', 'shelf_label']);
    expect(snapshotOfVersion(doc, 2)!.tables).toEqual([]);
    const unknown = doc.versions[2]!.diagnostics.filter((d) => d.code === 'knex/name-unknown');
    expect(unknown.map((d) => d.message)).toContain('the table name is not known statically (TableTool); the call is left out');
  });
});

function viewOf(t: Map<string, string>) {
  return {
    commit: 'tree',
    paths: () => [...t.keys()].sort(),
    has: (p: string) => t.has(p),
    blob: (p: string) => (t.has(p) ? `blob-${p}-${t.get(p)!.length}` : undefined),
    read: async (p: string) => t.get(p),
    under: (d: string) => [...t.keys()].filter((p) => d === '' || p.startsWith(d + '/')).sort(),
  };
}
