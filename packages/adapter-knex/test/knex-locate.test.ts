// Reading knexfiles statically, listing migration directories, resolving imports. The expected
// directories come from Node itself: each knexfile text below (our own) is also evaluated as
// CommonJS with its __dirname, and the directories it yields are compared with the static read.
import { posix } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { TreeView } from '@schema-strata/core';
import { knexfileSettings, locateKnex, migrationsIn, parseKnexSource, resolveImport, scanImports, naturalCompare, isKnexfile } from '../src/index.js';

/** Evaluate a CommonJS knexfile text as Node would (path is the only module it may require). */
function evaluate(text: string, dir: string, env: Record<string, string> = {}): Record<string, unknown> {
  const module = { exports: {} as Record<string, unknown> };
  const req = (m: string): unknown => {
    if (m === 'path' || m === 'node:path') return posix;
    throw new Error(`no module ${m}`);
  };
  new Function('module', 'exports', 'require', '__dirname', 'process', text)(module, module.exports, req, dir, { env, cwd: () => dir });
  return module.exports;
}

function staticRead(path: string, text: string, environment?: string) {
  const r = parseKnexSource(text);
  if (!r.ok) throw new Error('parse failed');
  return knexfileSettings(r.facts.config, path, environment);
}

/** Directories of a knexfile environment as Knex's CLI resolves them (relative to the knexfile's directory), repository-relative. */
function nodeRead(path: string, text: string, environment: string | null): string[] {
  const dir = '/repo/' + posix.dirname(path);
  const config = evaluate(text, posix.normalize(dir)) as Record<string, { migrations?: { directory?: string | string[] } }>;
  const env = environment ? config[environment]! : (config as { migrations?: { directory?: string | string[] } });
  const d = env.migrations?.directory ?? './migrations';
  return (Array.isArray(d) ? d : [d]).map((x) => posix.relative('/repo', posix.resolve(posix.normalize(dir), x)));
}

const KNEXFILES: Array<{ path: string; text: string; env: string | null; expect: { client?: string; dirs: string[] } }> = [
  {
    path: 'knexfile.js',
    text: "module.exports = { client: 'pg', migrations: { directory: './db/migrations' } };",
    env: null,
    expect: { client: 'pg', dirs: ['db/migrations'] },
  },
  {
    path: 'server/knexfile.js',
    text: "const path = require('path');\nmodule.exports = {\n  development: { client: 'sqlite3', migrations: { directory: path.join(__dirname, 'migrations') } },\n  production: { client: 'postgresql', migrations: { directory: path.join(__dirname, 'migrations') } },\n};",
    env: 'production',
    expect: { client: 'postgresql', dirs: ['server/migrations'] },
  },
  {
    path: 'knexfile.js',
    text: "const base = { client: 'mysql2', migrations: { directory: ['./migrations', './migrations/seeds-like'], tableName: 'migs' } };\nmodule.exports = { development: { ...base, connection: {} }, production: { ...base, connection: process.env.DATABASE_URL } };",
    env: 'production',
    expect: { client: 'mysql2', dirs: ['migrations', 'migrations/seeds-like'] },
  },
  {
    path: 'api/knexfile.js',
    text: "const path = require('path');\nconst config = { client: 'pg', migrations: { directory: path.resolve(__dirname, '..', 'database', 'migrations') } };\nmodule.exports = config;",
    env: null,
    expect: { client: 'pg', dirs: ['database/migrations'] },
  },
  {
    path: 'knexfile.js',
    text: "module.exports = { development: { client: 'sqlite3' }, test: { client: 'sqlite3', migrations: { directory: __dirname + '/test/migrations' } } };",
    env: 'development',
    expect: { client: 'sqlite3', dirs: ['migrations'] },
  },
];

describe('knexfiles read as syntax trees (checked against Node evaluating them)', () => {
  for (const k of KNEXFILES) {
    it(`${k.path}: ${k.text.slice(0, 60).replace(/\n/g, ' ')}...`, () => {
      const s = staticRead(k.path, k.text, k.env ?? undefined);
      expect(s.directories).toEqual(nodeRead(k.path, k.text, k.env));
      expect(s.directories).toEqual(k.expect.dirs);
      expect(s.client).toBe(k.expect.client);
    });
  }

  it('picks production, else development, else the first environment, unless one is asked for', () => {
    const text = "module.exports = { staging: { client: 'mysql' }, development: { client: 'sqlite3' }, production: { client: 'pg' } };";
    expect(staticRead('knexfile.js', text).environment).toBe('production');
    expect(staticRead('knexfile.js', text, 'staging').client).toBe('mysql');
    const noProd = "module.exports = { staging: { client: 'mysql' }, development: { client: 'sqlite3' } };";
    expect(staticRead('knexfile.js', noProd).environment).toBe('development');
    expect(staticRead('knexfile.js', "module.exports = { ci: { client: 'pg' } };").environment).toBe('ci');
    expect(staticRead('knexfile.js', text, 'nope').notes.join()).toContain('no environment "nope"');
  });

  it('reads TypeScript and ESM knexfiles, loadExtensions and sortDirsSeparately', () => {
    const ts = "import type { Knex } from 'knex';\nimport path from 'path';\nconst config: { [k: string]: Knex.Config } = {\n  development: { client: 'better-sqlite3', migrations: { directory: path.join(__dirname, 'src/db/migrations'), loadExtensions: ['.ts'], sortDirsSeparately: true } },\n};\nexport default config;\n";
    const s = staticRead('knexfile.ts', ts);
    expect(s).toMatchObject({ client: 'better-sqlite3', directories: ['src/db/migrations'], loadExtensions: ['.ts'], sortDirsSeparately: true });
    const esm = "import { dirname, join } from 'node:path';\nimport { fileURLToPath } from 'node:url';\nconst here = dirname(fileURLToPath(import.meta.url));\nexport default { client: 'pg', migrations: { directory: join(here, 'migrations') } };\n";
    expect(staticRead('db/knexfile.mjs', esm).directories).toEqual(['db/migrations']);
  });

  it('says what it cannot read, and falls back to ./migrations', () => {
    const s = staticRead('knexfile.js', "module.exports = { client: process.env.DB_CLIENT, migrations: { directory: process.env.MIGRATIONS } };");
    expect(s.client).toBeUndefined();
    expect(s.notes.join(' ')).toContain('not known statically');
    const fallback = staticRead('knexfile.js', "module.exports = { client: 'pg', migrations: { directory: process.env.MIGRATIONS_DIR || './db/migrations' } };");
    expect(fallback.directories).toEqual(['db/migrations']);
  });
});

describe('migration directories and imports', () => {
  it('lists the files directly in a directory with a loaded extension, as Knex does', () => {
    const paths = ['db/migrations/001_a.js', 'db/migrations/002_b.ts', 'db/migrations/003_c.mjs', 'db/migrations/types.d.ts', 'db/migrations/sub/004_d.js', 'db/migrations/README.md'];
    expect(migrationsIn(paths, 'db/migrations', ['.js', '.ts']).files).toEqual(['db/migrations/001_a.js', 'db/migrations/002_b.ts']);
    // a TypeScript project whose knexfile loads only compiled .js files that are not committed
    expect(migrationsIn(['m/1.ts', 'm/2.ts'], 'm', ['.js'])).toEqual({ files: ['m/1.ts', 'm/2.ts'], fromSources: true });
  });

  it('resolves relative imports as Node and TypeScript do', () => {
    const have = new Set(['db/names.ts', 'db/helpers/index.js', 'db/consts.cjs']);
    const has = (p: string) => have.has(p);
    expect(resolveImport('db/migrations/001.js', '../names', has)).toBe('db/names.ts');
    expect(resolveImport('db/migrations/001.ts', '../names.js', has)).toBe('db/names.ts');
    expect(resolveImport('db/migrations/001.ts', '../helpers', has)).toBe('db/helpers/index.js');
    expect(resolveImport('db/migrations/001.ts', '../consts.cjs', has)).toBe('db/consts.cjs');
    expect(resolveImport('db/migrations/001.ts', '../../../outside', has)).toBeUndefined();
    expect(scanImports("import a from './a';\nconst b = require(\"../b.js\");\nexport * from './c';\nimport('./d');\nimport x from 'knex';")).toEqual(['./a', '../b.js', './c', './d']);
  });

  it('knows knexfiles by name', () => {
    expect(['knexfile.js', 'api/knexfile.ts', 'knexfile.mjs', 'knexfile.cjs'].every(isKnexfile)).toBe(true);
    expect(['knexfile.json', 'src/knexfile-helper.js', 'myknexfile.js'].some(isKnexfile)).toBe(false);
  });

  it('sorts naturally when asked (digit runs as numbers)', () => {
    const names = ['10_c.js', '2_b.js', '1_a.js', '1_a2.js', '01_x.js'];
    expect([...names].sort(naturalCompare)).toEqual(['1_a.js', '1_a2.js', '01_x.js', '2_b.js', '10_c.js']);
    expect([...names].sort()).toEqual(['01_x.js', '10_c.js', '1_a.js', '1_a2.js', '2_b.js']);
  });
});

function tree(files: Record<string, string>): TreeView {
  const paths = Object.keys(files).sort();
  return {
    commit: 'c',
    paths: () => paths,
    has: (p) => p in files,
    blob: (p) => (p in files ? `blob:${p}:${files[p]!.length}` : undefined),
    read: async (p) => files[p],
    under: (d) => paths.filter((p) => d === '' || p.startsWith(d + '/')),
  };
}

const KNEX_MIGRATION = "exports.up = (knex) => knex.schema.createTable('t', (t) => { t.increments(); });\nexports.down = () => {};\n";

describe('locating the migrations of one commit', () => {
  it('follows the knexfile, with the files the migrations import and the init files', async () => {
    const t = tree({
      'knexfile.js': "module.exports = { client: 'pg', migrations: { directory: './db/migrations' } };",
      'db/migrations/001.js': "const { T } = require('../names');\n" + KNEX_MIGRATION,
      'db/names.js': "exports.T = 't';",
      'db/base.js': 'module.exports = async (knex) => {};',
      'src/app.js': 'console.log(1);',
    });
    const r = await locateKnex(t, { options: { 'knex-init': ['./db/base.js'] } });
    expect(r.files).toEqual(['knexfile.js', 'db/base.js', 'db/migrations/001.js', 'db/names.js']);
  });

  it('without a knexfile, takes a migrations directory of Knex migrations (the root one first)', async () => {
    const r = await locateKnex(tree({ 'migrations/001.js': KNEX_MIGRATION, 'packages/api/migrations/001.js': KNEX_MIGRATION }), { options: {} });
    expect(r.files).toEqual(['migrations/001.js']);
    const amb = await locateKnex(tree({ 'a/migrations/001.js': KNEX_MIGRATION, 'b/migrations/001.js': KNEX_MIGRATION }), { options: {} });
    expect(amb.ambiguous?.candidates).toEqual([['a/migrations/'], ['b/migrations/']]);
  });

  it('does not take the migrations of other tools for Knex migrations', async () => {
    const typeorm = "import { MigrationInterface, QueryRunner } from 'typeorm';\nexport class Init1 implements MigrationInterface {\n  async up(queryRunner: QueryRunner) { await queryRunner.query('CREATE TABLE t (id int)'); }\n  async down() {}\n}\n";
    const sequelize = "module.exports = { up: async (queryInterface, Sequelize) => { await queryInterface.createTable('t', {}); }, down: async () => {} };\n";
    const r = await locateKnex(tree({ 'src/migrations/1-Init.ts': typeorm, 'db/migrations/001.js': sequelize }), { options: {} });
    expect(r.files).toEqual([]);
    expect(r.searched).toContain('knexfile');
  });
});
