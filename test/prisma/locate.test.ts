/**
 * Where the Prisma adapter finds the schema at each commit, as Prisma's CLI would (Prisma docs,
 * "Schema location": the `schema` of prisma.config.ts, the `prisma.schema` field of
 * package.json, then ./prisma/schema.prisma and ./schema.prisma; a folder holds a multi-file
 * schema). Each case is a repository built with real git commits and run through
 * extractHistory; the ambiguous case also goes through the CLI.
 */
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { cleanUp, cli, extract, repository, tablesAt, tempDir } from './support/history.js';

afterAll(cleanUp);

const DS = 'datasource db {\n  provider = "postgresql"\n}\n';
const model = (name: string, table = name.toLowerCase() + 's'): string =>
  `model ${name} {\n  id Int @id\n\n  @@map("${table}")\n}\n`;
const schema = (...models: string[]): string => DS + '\n' + models.join('\n');

describe('package.json prisma.schema', () => {
  it('reads the file the field names, and a change of the field makes a version', async () => {
    const repo = await repository([
      { message: 'schema in db/', files: { 'db/coop.prisma': schema(model('Member')), 'package.json': '{"name":"coop","prisma":{"schema":"db/coop.prisma"}}' } },
      { message: 'a stray default-location schema is not read', files: { 'prisma/schema.prisma': schema(model('Stray')) } },
      { message: 'dependency bump: not a version', files: { 'package.json': '{"name":"coop","version":"2.0.0","prisma":{"schema":"db/coop.prisma"}}' } },
      { message: 'point at the other file', files: { 'package.json': '{"name":"coop","prisma":{"schema":"prisma/schema.prisma"}}' } },
    ]);
    const h = await extract(repo);
    expect(h.versions.map((v) => v.files.map((f) => f.path))).toEqual([['db/coop.prisma'], ['prisma/schema.prisma']]);
    expect(h.versions[0]!.consulted.map((f) => f.path)).toEqual(['package.json']);
    expect(tablesAt(h, 0)).toEqual(['members']);
    expect(tablesAt(h, 1)).toEqual(['strays']);
  });
});

describe('prisma.config.ts schema (read as a syntax tree, never run)', () => {
  const cases: Array<[string, string]> = [
    ['a string literal in defineConfig(...)', `import { defineConfig } from 'prisma/config';\nexport default defineConfig({ schema: 'db/coop.prisma' });\n`],
    ['path.join(...)', `import path from 'node:path';\nimport { defineConfig } from 'prisma/config';\nexport default defineConfig({\n  schema: path.join('db', 'coop.prisma'),\n});\n`],
    ['path.join(__dirname, ...)', `import path from 'node:path';\nexport default {\n  schema: path.join(__dirname, 'db', 'coop.prisma'),\n};\n`],
    ['a variable holding the config', `import type { PrismaConfig } from 'prisma';\nconst config: PrismaConfig = { schema: 'db/coop.prisma' };\nexport default config;\n`],
    ['a variable holding the path', `import { defineConfig } from 'prisma/config';\nconst schemaPath = 'db/coop.prisma';\nexport default defineConfig({ schema: schemaPath });\n`],
    ['a shorthand property', `import { defineConfig } from 'prisma/config';\nconst schema = 'db/coop.prisma';\nexport default defineConfig({ schema });\n`],
    ['satisfies', `import type { PrismaConfig } from 'prisma';\nexport default {\n  schema: 'db/coop.prisma',\n} satisfies PrismaConfig;\n`],
    ['a template literal', "export default { schema: `db/coop.prisma` };\n"],
  ];
  it.each(cases)('%s', async (_label, config) => {
    const repo = await repository([
      {
        message: 'config',
        files: {
          'prisma.config.ts': config,
          'db/coop.prisma': schema(model('Tool')),
          'prisma/schema.prisma': schema(model('Stray')),
          'package.json': '{"name":"coop","prisma":{"schema":"prisma/schema.prisma"}}',
        },
      },
    ]);
    const h = await extract(repo);
    expect(h.versions.map((v) => v.files.map((f) => f.path))).toEqual([['db/coop.prisma']]);
    expect(h.versions[0]!.consulted.map((f) => f.path)).toContain('prisma.config.ts');
    expect(tablesAt(h, 0)).toEqual(['tools']);
  });

  it('a config that names a folder reads every .prisma file under it as one schema', async () => {
    const repo = await repository([
      {
        message: 'multi-file',
        files: {
          'prisma.config.ts': `export default { schema: 'db/schema' };\n`,
          'db/schema/main.prisma': DS,
          'db/schema/models/members.prisma': model('Member'),
          'db/schema/models/tools.prisma': model('Tool'),
        },
      },
    ]);
    const h = await extract(repo);
    expect(h.versions[0]!.files.map((f) => f.path)).toEqual(['db/schema/main.prisma', 'db/schema/models/members.prisma', 'db/schema/models/tools.prisma']);
    expect(tablesAt(h, 0)).toEqual(['members', 'tools']);
  });
});

describe('default locations', () => {
  it('./prisma/schema.prisma wins over ./schema.prisma; then ./schema.prisma; then the ./prisma/schema folder', async () => {
    const repo = await repository([
      { message: 'root schema', files: { 'schema.prisma': schema(model('Member')) } },
      { message: 'prisma/ schema added: it is the one read', files: { 'prisma/schema.prisma': schema(model('Tool')) } },
      { message: 'both gone; a multi-file folder', files: { 'schema.prisma': null, 'prisma/schema.prisma': null, 'prisma/schema/base.prisma': DS, 'prisma/schema/loans.prisma': model('Loan') } },
      { message: 'one more file in the folder', files: { 'prisma/schema/repairs.prisma': model('Repair') } },
    ]);
    const h = await extract(repo);
    expect(h.versions.map((v) => v.files.map((f) => f.path))).toEqual([
      ['schema.prisma'],
      ['prisma/schema.prisma'],
      ['prisma/schema/base.prisma', 'prisma/schema/loans.prisma'],
      ['prisma/schema/base.prisma', 'prisma/schema/loans.prisma', 'prisma/schema/repairs.prisma'],
    ]);
    expect([0, 1, 2, 3].map((i) => tablesAt(h, i))).toEqual([['members'], ['tools'], ['loans'], ['loans', 'repairs']]);
  });
});

describe('monorepos', () => {
  it('one nested schema in a package is found', async () => {
    const repo = await repository([
      {
        message: 'monorepo',
        files: {
          'package.json': '{"name":"coop-root","private":true,"workspaces":["packages/*"]}',
          'packages/web/package.json': '{"name":"web"}',
          'packages/db/package.json': '{"name":"db"}',
          'packages/db/prisma/schema.prisma': schema(model('Member'), model('Tool')),
        },
      },
    ]);
    const h = await extract(repo);
    expect(h.versions[0]!.files.map((f) => f.path)).toEqual(['packages/db/prisma/schema.prisma']);
    expect(tablesAt(h, 0)).toEqual(['members', 'tools']);
  });

  it('several independent schemas stop the run with the candidates and the --path to use; --path then picks one', async () => {
    const repo = await repository([
      { message: 'postgres schema', files: { 'db/postgresql/schema.prisma': schema(model('Member')) } },
      { message: 'sqlite schema', files: { 'db/sqlite/schema.prisma': 'datasource db {\n  provider = "sqlite"\n}\n\n' + model('Member') } },
      { message: 'tool table in both', files: { 'db/postgresql/schema.prisma': schema(model('Member'), model('Tool')), 'db/sqlite/schema.prisma': 'datasource db {\n  provider = "sqlite"\n}\n\n' + model('Member') + model('Tool') } },
    ]);
    await expect(extract(repo)).rejects.toThrow(/several independent schemas found \(db\/postgresql\/schema\.prisma; db\/sqlite\/schema\.prisma\); choose one with --path/);
    const h = await extract(repo, { paths: ['db/sqlite/schema.prisma'] });
    expect(h.versions.map((v) => v.files.map((f) => f.path))).toEqual([['db/sqlite/schema.prisma'], ['db/sqlite/schema.prisma']]);
    expect(tablesAt(h, 1)).toEqual(['members', 'tools']);

    // the same through the CLI: one line, non-zero exit, no stack trace; then --path works
    const refused = cli(['extract', repo, '-o', '-', '--no-cache', '--quiet']);
    expect(refused.code).not.toBe(0);
    expect(refused.stderr.trim().split('\n')).toHaveLength(1);
    expect(refused.stderr).toMatch(/several independent schemas found .*--path db\/postgresql\/schema\.prisma/);
    expect(refused.stderr).not.toMatch(/\n\s+at /);
    const picked = cli(['extract', repo, '-o', '-', '--no-cache', '--quiet', '--path', 'db/postgresql/schema.prisma']);
    expect(picked.code).toBe(0);
    const doc = JSON.parse(picked.stdout) as { versions: Array<{ files: Array<{ path: string }> }> };
    expect(doc.versions.map((v) => v.files.map((f) => f.path))).toEqual([['db/postgresql/schema.prisma'], ['db/postgresql/schema.prisma']]);
  });
});

describe('bare repositories', () => {
  it('a bare clone gives the same versions as its work-tree repository (library and CLI)', async () => {
    const repo = await repository([
      { message: 'members', files: { 'prisma/schema.prisma': schema(model('Member')) } },
      { message: 'tools', files: { 'prisma/schema.prisma': schema(model('Member'), model('Tool')) } },
    ]);
    const bare = join(tempDir(), 'coop.git');
    expect(spawnSync('git', ['clone', '--quiet', '--bare', repo, bare]).status).toBe(0);
    const [a, b] = [await extract(repo), await extract(bare)];
    expect(b.versions.map((v) => [v.commit, v.status, v.snapshot])).toEqual(a.versions.map((v) => [v.commit, v.status, v.snapshot]));
    const r = cli(['extract', bare, '-o', '-', '--no-cache', '--quiet']);
    expect(r.code).toBe(0);
    expect((JSON.parse(r.stdout) as { versions: unknown[] }).versions).toHaveLength(2);
  });
});
