// Which project files a migration's imports bring into a version: only the modules it loads when
// it runs. Imports only in comments, `import type`, and imports whose bindings serve only as types
// (TypeScript elides them) are not followed, so that editing such a module (a database wrapper
// that imports half the application, say) makes no version. Checked against TypeScript's own
// emit (transpileModule to CommonJS: the require() calls left in its output) and against locating
// the files of a small project, whose migration Knex runs on SQLite with the type-only module
// unloadable.
import { describe, expect, it } from 'vitest';
import ts from 'typescript';
import knexAdapter, { runtimeImportsOf } from '@schema-strata/adapter-knex';
import { replaySteps, tablesOf } from './fixture.js';
import { runKnex } from './oracle.js';
import { fromDatabase, fromReplay } from './compare.js';

const MIGRATION = [
  "import type { Knex } from 'knex';",
  "import type { Ledger } from '../src/ledger';",
  "import { CoopDb } from '../src/db';",
  "import { stampColumns, type Stamp } from '../src/columns';",
  "import * as shapes from '../src/shapes';",
  "import Base from '../src/base';",
  "// import { oldHelper } from '../src/old';",
  "/* const gone = require('../src/gone'); */",
  "export { LOAN_DAYS } from '../src/rules';",
  "export type { Member } from '../src/members';",
  'class Loans extends Base implements Stamp {}',
  'interface Kept extends Ledger {}',
  'export async function up(knex: CoopDb): Promise<Array<Kept>> {',
  "  let layout: typeof shapes | undefined;",
  "  const { SHELF } = require('../src/names');",
  "  await knex.schema.createTable('loans', (t: Knex.CreateTableBuilder) => {",
  '    t.increments();',
  '    stampColumns(t);',
  '  });',
  '  void Loans; void layout; void SHELF;',
  '  return [];',
  '}',
  'export async function down(): Promise<void> {}',
  '',
].join('\n');

/** The relative modules TypeScript's CommonJS emit still requires. */
function emittedRequires(text: string): string[] {
  const js = ts.transpileModule(text, { compilerOptions: { module: ts.ModuleKind.CommonJS, target: ts.ScriptTarget.ES2020, removeComments: true } }).outputText;
  return [...new Set([...js.matchAll(/require\((["'])(\.[^"']+)\1\)/g)].map((m) => m[2]!))].sort();
}

describe('the project files a migration brings in (oracle: TypeScript 5 transpileModule)', () => {
  it('are the modules TypeScript keeps in its emit', () => {
    const expected = emittedRequires(MIGRATION);
    expect(expected).toEqual(['../src/base', '../src/columns', '../src/names', '../src/rules']);
    expect([...runtimeImportsOf(MIGRATION)].sort()).toEqual(expected);
  });

  it('a module imported only for its types is not located, and Knex never loads it', async () => {
    const tree = new Map<string, string>([
      ['knexfile.js', "module.exports = { client: 'better-sqlite3', useNullAsDefault: true, migrations: { directory: './migrations', loadExtensions: ['.ts'] } };\n"],
      // the wrapper imports the rest of the application; loading it would fail
      ['src/db.ts', "import { app } from './app';\nthrow new Error('the database wrapper is not loaded by the migrations');\nexport type CoopDb = typeof app;\n"],
      ['src/app.ts', 'export const app = { name: "tool library" };\n'],
      ['src/columns.ts', "export function stampColumns(t: any) {\n  t.string('lent_by', 40).notNullable();\n}\n"],
      [
        'migrations/001_loans.ts',
        "import type { Knex } from 'knex';\nimport { CoopDb } from '../src/db';\nimport { stampColumns } from '../src/columns';\nexport async function up(knex: CoopDb & Knex): Promise<void> {\n  await knex.schema.createTable('loans', (t: Knex.CreateTableBuilder) => {\n    t.increments();\n    stampColumns(t);\n  });\n}\nexport async function down(): Promise<void> {}\n",
      ],
    ]);
    const view = {
      commit: 'tree',
      paths: () => [...tree.keys()].sort(),
      has: (p: string) => tree.has(p),
      blob: (p: string) => (tree.has(p) ? `blob-${p}` : undefined),
      read: async (p: string) => tree.get(p),
      under: (d: string) => [...tree.keys()].filter((p) => p.startsWith(d + '/')).sort(),
    };
    const located = await knexAdapter.locate(view, { options: {} });
    expect([...located.files].sort()).toEqual(['knexfile.js', 'migrations/001_loans.ts', 'src/columns.ts']);
    const oracle = await runKnex(tree, { engine: 'sqlite', environment: 'development' });
    const steps = await replaySteps(tree, { 'knex-client': 'sqlite' });
    expect(fromReplay(tablesOf(steps[steps.length - 1]!.snapshot), 'sqlite')).toEqual(fromDatabase(oracle.final, 'sqlite'));
    expect(oracle.final.map((t) => t.name)).toEqual(['loans']);
  });
});
