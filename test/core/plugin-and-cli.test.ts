import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { day, git, makeRepo, MEMBER, prismaSchema, ROOT, runCli, tempDir } from '../helpers/repo.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());
const ADAPTER = join(ROOT, 'test', 'fixtures', 'adapters', 'tables-txt-adapter.mjs');

describe('a third-party adapter, loaded by path', () => {
  it('runs end to end through the CLI without any change to core', async () => {
    const repo = await makeRepo(tmp.dir, 'txt', [
      { date: day(0), message: 'two tables', files: { 'tables.txt': 'members: id name\ntools: id label\n' } },
      { date: day(1), message: 'a column more', files: { 'tables.txt': 'members: id name email\ntools: id label\n' } },
      { date: day(2), message: 'broken', files: { 'tables.txt': 'members: id name email\n!!\n' } },
      { date: day(3), message: 'loans', files: { 'tables.txt': 'members: id name email\ntools: id label\nloans: id\n' } },
    ]);
    const out = join(tmp.dir, 'txt.json');
    const r = runCli(['extract', repo, '--adapter', ADAPTER, '--tables-txt-upper', '-o', out, '--no-cache']);
    expect(r.stderr).toContain('4 versions');
    expect(r.code).toBe(0);
    const doc = JSON.parse(readFileSync(out, 'utf8'));
    expect(doc.source.adapter).toEqual({ name: 'tables-txt', version: '1.0.0', source: ADAPTER });
    expect(doc.source.options).toEqual({ 'tables-txt-upper': true });
    expect(doc.versions.map((v: { status: string }) => v.status)).toEqual(['ok', 'ok', 'partial', 'ok']);
    const kinds = doc.changes.map((c: { version: number; kind: string; table: string; column?: string }) => `${c.version} ${c.kind} ${c.table}${c.column ? '.' + c.column : ''}`);
    expect(kinds).toEqual(['0 table-added MEMBERS', '0 table-added TOOLS', '1 column-added MEMBERS.email', '3 table-added LOANS']);
    // its options show in --help
    const help = runCli(['extract', '--help', '--adapter', ADAPTER]);
    expect(help.stdout).toContain('--tables-txt-upper');
    expect(help.stdout).toContain('[tables-txt] upper-case the table names');
  });
});

describe('one-line errors with documented exit codes, never a stack trace', () => {
  const expectOneLine = (r: { stderr: string }): void => {
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(r.stderr).not.toMatch(/\n\s+at /);
    expect(lines[0]).toMatch(/^schema-strata: /);
  };

  it('not a git repository', () => {
    const r = runCli(['extract', tmp.dir, '-o', '-']);
    expect(r.code).toBe(1);
    expectOneLine(r);
    expect(r.stderr).toContain('is not a git repository');
  });

  it('no such directory', () => {
    const r = runCli(['extract', join(tmp.dir, 'nowhere'), '-o', '-']);
    expect(r.code).toBe(1);
    expectOneLine(r);
  });

  it('an empty repository', () => {
    const dir = join(tmp.dir, 'empty');
    git(tmp.dir, 'init', '-q', dir);
    const r = runCli(['extract', dir, '-o', '-', '--adapter', 'prisma']);
    expect(r.code).toBe(1);
    expectOneLine(r);
    expect(r.stderr).toContain('empty repository');
  });

  it('a shallow clone says that history is incomplete and how to deepen it', async () => {
    const repo = await makeRepo(tmp.dir, 'deep', [
      { date: day(0), message: 'a', files: { 'prisma/schema.prisma': prismaSchema(MEMBER.replace('  loans Loan[]\n', '')) } },
      { date: day(1), message: 'b', files: { 'README.md': 'x\n' } },
    ]);
    const shallow = join(tmp.dir, 'shallow');
    git(tmp.dir, 'clone', '-q', '--depth', '1', `file://${repo}`, shallow);
    const r = runCli(['extract', shallow, '-o', '-', '--adapter', 'prisma']);
    expect(r.code).toBe(1);
    expectOneLine(r);
    expect(r.stderr).toContain('shallow clone');
    expect(r.stderr).toContain('--unshallow');
  });

  it('an unknown ref', async () => {
    const repo = await makeRepo(tmp.dir, 'refs', [{ date: day(0), message: 'a', files: { 'prisma/schema.prisma': prismaSchema(MEMBER.replace('  loans Loan[]\n', '')) } }]);
    const r = runCli(['extract', repo, '--ref', 'no-such-branch', '-o', '-']);
    expect(r.code).toBe(2);
    expectOneLine(r);
    expect(r.stderr).toContain("unknown ref 'no-such-branch'");
  });

  it('no schema found says what was searched', async () => {
    const repo = await makeRepo(tmp.dir, 'noschema', [{ date: day(0), message: 'a', files: { 'src/index.ts': 'export {};\n' } }]);
    const r = runCli(['extract', repo, '--adapter', 'prisma', '-o', '-']);
    expect(r.code).toBe(1);
    expectOneLine(r);
    expect(r.stderr).toContain('no prisma schema found');
    expect(r.stderr).toContain('prisma/schema.prisma');
  });

  it('unknown options and commands are usage errors (exit 2)', () => {
    expect(runCli(['extract', '.', '--bogus']).code).toBe(2);
    expect(runCli(['frobnicate']).code).toBe(2);
    const r = runCli(['extract', '.', '--adapter', 'no-such-orm']);
    expect(r.code).toBe(2);
    expectOneLine(r);
  });

  it('--help and --version exit 0', () => {
    const v = runCli(['--version']);
    expect(v.code).toBe(0);
    expect(v.stdout.trim()).toMatch(/^\d+\.\d+\.\d+$/);
    for (const cmd of ['extract', 'show', 'demo', 'adapters']) {
      const h = runCli([cmd, '--help']);
      expect(h.code).toBe(0);
      expect(h.stdout).toContain(`Usage: schema-strata ${cmd}`);
    }
  });

  it('--strict turns diagnostics of severity error into exit code 3', async () => {
    const repo = await makeRepo(tmp.dir, 'strict', [
      { date: day(0), message: 'ok', files: { 'prisma/schema.prisma': prismaSchema(MEMBER.replace('  loans Loan[]\n', '')) } },
      { date: day(1), message: 'broken', files: { 'prisma/schema.prisma': prismaSchema('model Member {\n  id Int @id\n  name Strin\n}\n') } },
    ]);
    expect(runCli(['extract', repo, '-o', join(tmp.dir, 's1.json'), '--no-cache']).code).toBe(0);
    expect(runCli(['extract', repo, '-o', join(tmp.dir, 's2.json'), '--no-cache', '--strict']).code).toBe(3);
  });
});
