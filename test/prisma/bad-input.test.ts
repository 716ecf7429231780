/**
 * Bad and unusual input in real git histories: each case gives its documented diagnostic and a
 * complete output, validated against packages/core/schema/history.schema.json (ajv, JSON Schema
 * draft 2020-12, with ajv-formats). Schemas written for older Prisma versions must still parse.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { assemblePrisma } from '@schema-strata/adapter-prisma';
import type { History } from '@schema-strata/core';
import { cleanUp, cli, documentOf, extract, repository, schemaErrors, tablesAt, tempDir } from './support/history.js';

afterAll(cleanUp);

const DS = 'datasource db {\n  provider = "postgresql"\n}\n';
const MEMBER = 'model Member {\n  id    Int    @id\n  email String @unique\n\n  @@map("members")\n}\n';
const TOOL = 'model Tool {\n  id   Int    @id\n  name String\n\n  @@map("tools")\n}\n';
const good = (...models: string[]): string => [DS, ...models].join('\n');

/** Every output these tests make is a complete, valid interchange document. */
function expectValidDocument(h: History): void {
  const doc = documentOf(h);
  expect(schemaErrors(doc)).toEqual([]);
  expect(doc.versions.length).toBe(h.versions.length);
}
const statuses = (h: History): string[] => h.versions.map((v) => v.status);
const codes = (h: History, i: number): string[] => h.versions[i]!.diagnostics.map((d) => d.code);

describe('a schema that does not parse', () => {
  it('is carried, with a diagnostic giving file, line and the engine message without colour codes; the run goes on', async () => {
    const broken = good(MEMBER) + '\nmodel Tool {\n  id Int @id\n  name Strin\n}\n';
    const repo = await repository([
      { message: 'members', files: { 'prisma/schema.prisma': good(MEMBER) } },
      { message: 'typo in a type', files: { 'prisma/schema.prisma': broken } },
      { message: 'typo fixed', files: { 'prisma/schema.prisma': good(MEMBER, TOOL) } },
    ]);
    const h = await extract(repo);
    expect(statuses(h)).toEqual(['ok', 'carried', 'ok']);
    const err = h.versions[1]!.diagnostics.find((d) => d.code === 'prisma/parse-error')!;
    const line = broken.split('\n').findIndex((l) => /\bStrin\b/.test(l)) + 1;
    expect(err).toMatchObject({ severity: 'error', file: 'prisma/schema.prisma', line });
    // the engine's own words, as Prisma prints them (less the colour codes)
    expect(err.message).toMatch(/Type "Strin" is neither a built-in type, nor refers to another model/);
    // eslint-disable-next-line no-control-regex
    expect(err.message).not.toMatch(/\u001b\[/);
    expect(codes(h, 1)).toContain('schema/carried');
    expect(h.versions[1]!.snapshot).toBe(h.versions[0]!.snapshot);
    expect(tablesAt(h, 2)).toEqual(['members', 'tools']);
    expectValidDocument(h);
  });

  it('a schema that is broken from the first commit on makes no version until it parses', async () => {
    const repo = await repository([
      { message: 'broken start', files: { 'schema.prisma': 'model {\n' } },
      { message: 'fixed', files: { 'schema.prisma': good(MEMBER) } },
    ]);
    const h = await extract(repo);
    expect(statuses(h)).toEqual(['ok']);
    expect(h.diagnostics.some((d) => d.code === 'prisma/parse-error' && /before version 0/.test(d.message))).toBe(true);
    expectValidDocument(h);
  });
});

describe('a history in which no version builds', () => {
  it.each([
    ['a MongoDB schema', 'datasource db {\n  provider = "mongodb"\n}\n\nmodel Tool {\n  id   String @id @map("_id") @db.ObjectId\n  name String\n}\n', /the datasource provider is mongodb, which has no relational tables/],
    ['a schema that never parses', 'model Tool {\n  id Int @id\n  name Strin\n}\n', /Type "Strin" is neither a built-in type/],
  ])('%s: one line naming the reason, non-zero exit, no stack trace (library and CLI)', async (_label, text, reason) => {
    const repo = await repository([{ message: 'the only schema', files: { 'prisma/schema.prisma': text } }]);
    await expect(extract(repo)).rejects.toThrow(reason);
    const r = cli(['extract', repo, '-o', '-', '--no-cache', '--quiet']);
    expect(r.code).toBe(1);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/no version of the prisma schema could be built/);
    expect(r.stderr).toMatch(reason);
    expect(r.stdout).toBe('');
  });
});

describe('files that cannot be read as a schema', () => {
  it('an empty file: prisma/empty-schema, carried', async () => {
    const repo = await repository([
      { message: 'members', files: { 'prisma/schema.prisma': good(MEMBER) } },
      { message: 'emptied', files: { 'prisma/schema.prisma': '' } },
      { message: 'whitespace only', files: { 'prisma/schema.prisma': '\n  \n' } },
      { message: 'back', files: { 'prisma/schema.prisma': good(MEMBER, TOOL) } },
    ]);
    const h = await extract(repo);
    expect(statuses(h)).toEqual(['ok', 'carried', 'carried', 'ok']);
    expect(h.versions[1]!.diagnostics.find((d) => d.code === 'prisma/empty-schema')).toMatchObject({ severity: 'error', file: 'prisma/schema.prisma' });
    expectValidDocument(h);
  });

  it('a binary file: file/binary, carried', async () => {
    const repo = await repository([
      { message: 'members', files: { 'prisma/schema.prisma': good(MEMBER) } },
      { message: 'binary garbage', files: { 'prisma/schema.prisma': '\u0000\u0001\u0002PK\u0003\u0004\u0000\u0000binary' } },
      { message: 'back', files: { 'prisma/schema.prisma': good(MEMBER, TOOL) } },
    ]);
    const h = await extract(repo);
    expect(statuses(h)).toEqual(['ok', 'carried', 'ok']);
    expect(h.versions[1]!.diagnostics.find((d) => d.code === 'file/binary')).toMatchObject({ severity: 'error', file: 'prisma/schema.prisma' });
    expectValidDocument(h);
  });

  it('a 20 MB file is over the default limit (5MB): file/too-large, carried; --max-file-size raises the limit', async () => {
    const huge = good(MEMBER) + ('// ' + 'x'.repeat(1021) + '\n').repeat(20 * 1024);
    expect(huge.length).toBeGreaterThan(20 * 1024 * 1024);
    const repo = await repository([
      { message: 'members', files: { 'prisma/schema.prisma': good(MEMBER) } },
      { message: 'a huge comment', files: { 'prisma/schema.prisma': huge } },
      { message: 'small again', files: { 'prisma/schema.prisma': good(MEMBER, TOOL) } },
    ]);
    const h = await extract(repo);
    expect(statuses(h)).toEqual(['ok', 'carried', 'ok']);
    const d = h.versions[1]!.diagnostics.find((x) => x.code === 'file/too-large')!;
    expect(d).toMatchObject({ severity: 'error', file: 'prisma/schema.prisma' });
    expect(d.message).toMatch(/over the size limit \(--max-file-size\)/);
    expectValidDocument(h);

    // the limit is an option: a smaller one turns the two-table schema away too; a larger one reads the huge file (library and CLI)
    const small = await extract(repo, { maxFileBytes: good(MEMBER).length });
    expect(statuses(small)).toEqual(['ok', 'carried', 'carried']);
    expect(codes(small, 2)).toContain('file/too-large');
    const out = join(tempDir(), 'history.json');
    const r = cli(['extract', repo, '-o', out, '--no-cache', '--quiet', '--max-file-size', '30MB']);
    expect(r.code).toBe(0);
    const doc = JSON.parse(readFileSync(out, 'utf8')) as { versions: Array<{ status: string }> };
    expect(schemaErrors(doc)).toEqual([]);
    expect(doc.versions.map((v) => v.status)).toEqual(['ok', 'no change', 'ok']);
  });
});

describe('text forms that change nothing', () => {
  it('CRLF line ends: same tables, same lines; switching line ends is a no change version', async () => {
    const lf = good(MEMBER, TOOL);
    const repo = await repository([
      { message: 'LF', files: { 'prisma/schema.prisma': lf } },
      { message: 'CRLF', files: { 'prisma/schema.prisma': lf.replace(/\n/g, '\r\n') } },
    ]);
    const h = await extract(repo);
    expect(statuses(h)).toEqual(['ok', 'no change']);
    expect(tablesAt(h, 1)).toEqual(['members', 'tools']);
    const crlf = assemblePrisma({ files: [{ path: 's.prisma', blob: '1', text: lf.replace(/\n/g, '\r\n') }], missing: [] }, {});
    if ('failed' in crlf) throw new Error('CRLF schema failed');
    const tool = crlf.snapshot.tables.find((t) => t.name === 'tools')!;
    expect(tool.origin!.line).toBe(lf.split('\n').findIndex((l) => l.startsWith('model Tool')) + 1);
    expect(tool.columns.map((c) => c.name)).toEqual(['id', 'name']);
    expectValidDocument(h);
  });

  it('CRLF with connection URLs and an error: the error keeps its line', async () => {
    const text = 'datasource db {\r\n  provider = "postgresql"\r\n  url = env("DATABASE_URL")\r\n}\r\n\r\nmodel Tool {\r\n  id Int @id\r\n  name Strin\r\n}\r\n';
    const r = assemblePrisma({ files: [{ path: 's.prisma', blob: '1', text }], missing: [] }, {});
    expect('failed' in r && r.diagnostics[0]).toMatchObject({ code: 'prisma/parse-error', file: 's.prisma', line: 8 });
  });

  it('a byte-order mark: read as if absent; adding one is a no change version', async () => {
    const repo = await repository([
      { message: 'plain', files: { 'prisma/schema.prisma': good(MEMBER) } },
      { message: 'with a BOM', files: { 'prisma/schema.prisma': '\uFEFF' + good(MEMBER) } },
      { message: 'BOM, and a table', files: { 'prisma/schema.prisma': '\uFEFF' + good(MEMBER, TOOL) } },
    ]);
    const h = await extract(repo);
    expect(statuses(h)).toEqual(['ok', 'no change', 'ok']);
    expect(tablesAt(h, 2)).toEqual(['members', 'tools']);
    expectValidDocument(h);
  });
});

describe('a schema that moves or disappears', () => {
  it('moved mid-history: the move is a no change version and the tables keep their ids', async () => {
    const repo = await repository([
      { message: 'at the root', files: { 'schema.prisma': good(MEMBER, TOOL) } },
      { message: 'moved into prisma/', files: { 'schema.prisma': null, 'prisma/schema.prisma': good(MEMBER, TOOL) } },
      { message: 'moved to db/, named by package.json', files: { 'prisma/schema.prisma': null, 'db/coop.prisma': good(MEMBER, TOOL), 'package.json': '{"prisma":{"schema":"db/coop.prisma"}}' } },
      { message: 'a column', files: { 'db/coop.prisma': good(MEMBER, TOOL.replace('name String', 'name String\n  note String?')) } },
    ]);
    const h = await extract(repo);
    expect(statuses(h)).toEqual(['ok', 'no change', 'no change', 'ok']);
    expect(h.versions.map((v) => v.files[0]!.path)).toEqual(['schema.prisma', 'prisma/schema.prisma', 'db/coop.prisma', 'db/coop.prisma']);
    expect(h.changes.filter((c) => c.kind === 'table-added' || c.kind === 'table-removed').map((c) => c.version)).toEqual([0, 0]);
    expect(h.changes.filter((c) => c.version === 3).map((c) => [c.kind, c.table, c.column])).toEqual([['column-added', 'tools', 'note']]);
    expectValidDocument(h);
  });

  it('deleted and later re-added: an absent version, then the tables come back with their ids', async () => {
    const repo = await repository([
      { message: 'schema', files: { 'prisma/schema.prisma': good(MEMBER, TOOL) } },
      { message: 'schema deleted', files: { 'prisma/schema.prisma': null, 'README.md': 'moving databases' } },
      { message: 'schema back, one table more', files: { 'prisma/schema.prisma': good(MEMBER, TOOL, 'model Loan {\n  id Int @id\n\n  @@map("loans")\n}\n') } },
    ]);
    const h = await extract(repo);
    expect(statuses(h)).toEqual(['ok', 'absent', 'ok']);
    expect(h.versions[1]!.snapshot).toBeNull();
    expect(codes(h, 1)).toContain('schema/absent');
    expect(tablesAt(h, 2)).toEqual(['loans', 'members', 'tools']);
    // members and tools were never removed: the only change after version 0 is the new table
    expect(h.changes.filter((c) => c.version > 0).map((c) => [c.kind, c.table])).toEqual([['table-added', 'loans']]);
    expectValidDocument(h);
  });
});

describe('schemas written for older Prisma versions (fixtures in test/fixtures/prisma/old-syntax)', () => {
  const dir = join(import.meta.dirname, '..', 'fixtures', 'prisma', 'old-syntax');
  const read = (name: string): string => readFileSync(join(dir, name), 'utf8');
  const tablesOf = (name: string, text = read(name)) => {
    const r = assemblePrisma({ files: [{ path: name, blob: '0', text }], missing: [] }, {});
    if ('failed' in r) throw new Error(`${name}: ${JSON.stringify(r.diagnostics)}`);
    // origins differ with the header's length; the meaning must not
    return { tables: JSON.parse(JSON.stringify(r.snapshot.tables, (k, v) => (k === 'origin' ? undefined : v))), diagnostics: r.diagnostics };
  };

  it.each([
    ['connection-urls.prisma', 'current.prisma'],
    ['removed-preview-features.prisma', 'current.prisma'],
    ['referential-integrity.prisma', 'relation-mode.prisma'],
  ])('%s parses, and means what %s means', (oldName, currentName) => {
    expect(tablesOf(oldName).tables).toEqual(tablesOf(currentName).tables);
  });

  it('referentialIntegrity = "prisma" marks the foreign keys orm-enforced', () => {
    const { tables } = tablesOf('referential-integrity.prisma');
    const loan = (tables as Array<{ name: string; foreignKeys: Array<{ enforcement: string }> }>).find((t) => t.name === 'Loan')!;
    expect(loan.foreignKeys.map((f) => f.enforcement)).toEqual(['orm']);
  });

  it('preview features the engine no longer knows are left out, with an info diagnostic; line numbers stay', () => {
    const { diagnostics } = tablesOf('removed-preview-features.prisma');
    expect(diagnostics).toContainEqual({
      severity: 'info', code: 'prisma/preview-feature-dropped',
      message: 'preview features insensitiveFilters, metrics of an older Prisma left out: the engine of this adapter no longer knows them',
    });
    const text = read('removed-preview-features.prisma').replace('email   String   @unique', 'email   Strin    @unique');
    const r = assemblePrisma({ files: [{ path: 'old.prisma', blob: '0', text }], missing: [] }, {});
    expect('failed' in r && r.diagnostics.map((d) => d.line)).toEqual([text.split('\n').findIndex((l) => /\bStrin\b/.test(l)) + 1]);
  });

  it('in a history: the old forms are ok versions, and switching to the current form is no change', async () => {
    const repo = await repository([
      { message: 'prisma 3', files: { 'prisma/schema.prisma': read('connection-urls.prisma') } },
      { message: 'prisma 4 preview features', files: { 'prisma/schema.prisma': read('removed-preview-features.prisma') } },
      { message: 'prisma 7', files: { 'prisma/schema.prisma': read('current.prisma') } },
    ]);
    const h = await extract(repo);
    expect(statuses(h)).toEqual(['ok', 'no change', 'no change']);
    expect(codes(h, 1)).toContain('prisma/preview-feature-dropped');
    expectValidDocument(h);
  });
});
