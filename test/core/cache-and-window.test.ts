import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { appendCommits, extractHistory, serialiseDocument, toDocument, GENERATOR } from '@schema-strata/core';
import prisma from '@schema-strata/adapter-prisma';
import { day, git, LOAN, makeRepo, MEMBER, prismaSchema, runCli, tempDir, TOOL } from '../helpers/repo.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

const M = MEMBER.replace('  loans Loan[]\n', '');
const T = TOOL.replace('  loans Loan[]\n', '');
const steps = [
  prismaSchema(M),
  prismaSchema(M + T),
  prismaSchema(M.replace('  name  String\n', '  name  String\n  email String?\n') + T),
  prismaSchema(M.replace('  name  String\n', '  name  String\n  email String?\n') + T),
  prismaSchema(MEMBER.replace('  name  String\n', '  name  String\n  email String?\n') + TOOL + LOAN),
];

async function history(name: string): Promise<string> {
  return makeRepo(tmp.dir, name, steps.map((s, i) => ({
    date: day(i * 40),
    message: `step ${i}`,
    files: (i === 3 ? { 'README.md': 'no schema change\n' } : { 'prisma/schema.prisma': s }) as Record<string, string>,
  })));
}

describe('the parse cache', () => {
  it('parses only what is new after one more commit, and the output is the same bytes as without cache', async () => {
    const repo = await history('cache');
    const cacheDir = join(tmp.dir, 'cache-dir');
    const cold = await extractHistory({ repo, adapter: prisma, cacheDir });
    expect(cold.stats.assembled).toBe(4);
    expect(cold.stats.assembleCacheHits).toBe(0);
    expect(readdirSync(cacheDir).filter((f) => f.endsWith('.jsonl'))).toHaveLength(1);

    await appendCommits(repo, [{ date: day(300), message: 'tools get a note', files: { 'prisma/schema.prisma': steps[4]!.replace('  label String\n', '  label String\n  note  String?\n') } }]);
    const warm = await extractHistory({ repo, adapter: prisma, cacheDir });
    expect(warm.versions).toHaveLength(5);
    expect(warm.stats.assembled).toBe(1);
    expect(warm.stats.assembleCacheHits).toBe(4);
    expect(warm.stats.blobsRead).toBe(1);

    const fresh = await extractHistory({ repo, adapter: prisma });
    expect(serialiseDocument(toDocument(warm, GENERATOR))).toBe(serialiseDocument(toDocument(fresh, GENERATOR)));

    // a window that starts later needs the origins of tables that first appeared before it,
    // which the cache does not keep (a run over the whole history never needs them): its first
    // version is assembled again, the rest come from the cache, and the bytes are the same as
    // without cache
    const since = git(repo, 'rev-list', '--reverse', 'HEAD').trim().split('\n')[2]!;
    const warmWindow = await extractHistory({ repo, adapter: prisma, cacheDir, since });
    expect(warmWindow.stats.assembled).toBe(1);
    expect(warmWindow.stats.assembleCacheHits).toBe(warmWindow.versions.length - 1);
    const freshWindow = await extractHistory({ repo, adapter: prisma, since });
    const doc = serialiseDocument(toDocument(warmWindow, GENERATOR));
    expect(doc).toBe(serialiseDocument(toDocument(freshWindow, GENERATOR)));
    expect(doc).toContain('"line":');
    // the unit assembled again was written back with those origins: a second such run assembles nothing
    const again = await extractHistory({ repo, adapter: prisma, cacheDir, since });
    expect(again.stats.assembled).toBe(0);
    expect(serialiseDocument(toDocument(again, GENERATOR))).toBe(doc);
  });

  it('keeps a cache per adapter options: another option value parses again', async () => {
    const repo = await history('cache-options');
    const cacheDir = join(tmp.dir, 'cache-options-dir');
    await extractHistory({ repo, adapter: prisma, cacheDir });
    const other = await extractHistory({ repo, adapter: prisma, cacheDir, adapterOptions: { 'prisma-join-key': 'unique' } });
    expect(other.stats.assembleCacheHits).toBe(0);
    expect(readdirSync(cacheDir).filter((f) => f.endsWith('.jsonl'))).toHaveLength(2);
  });

  it('--no-cache writes nothing to the cache directory', async () => {
    const repo = await history('nocache');
    const cacheDir = join(tmp.dir, 'never-made');
    const r = runCli(['extract', repo, '--no-cache', '--cache-dir', cacheDir, '-o', join(tmp.dir, 'nc.json'), '--quiet']);
    expect(r.code).toBe(0);
    expect(() => readdirSync(cacheDir)).toThrow();
  });
});

describe('the --since / --until window', () => {
  it('by date: version 0 is the first version at or after --since', async () => {
    const repo = await history('window-date');
    const h = await extractHistory({ repo, adapter: prisma, since: '2024-02-01', until: '2024-05-31' });
    expect(h.versions.map((v) => v.subject)).toEqual(['step 1', 'step 2']);
    // the window's version 0 holds the whole schema as it stood: both tables, born "initially"
    expect(h.changes.filter((c) => c.version === 0).map((c) => `${c.kind} ${c.table}`)).toEqual(['table-added Member', 'table-added Tool']);
  });

  it('by revision, and an --until date covers that whole day', async () => {
    const repo = await history('window-rev');
    const commits = git(repo, 'rev-list', '--reverse', 'HEAD').trim().split('\n');
    const h = await extractHistory({ repo, adapter: prisma, since: commits[2]!, until: day(160).slice(0, 10) });
    expect(h.versions.map((v) => v.subject)).toEqual(['step 2', 'step 4']);
  });

  it('a bad window value is a usage error', () => {
    const r = runCli(['extract', tmp.dir, '--since', 'not-a-date']);
    expect(r.code).not.toBe(0);
  });
});

describe('the interchange file on disk', () => {
  it('is written atomically (no temporary file left) and `-o -` writes the same bytes to standard output', async () => {
    const repo = await history('atomic');
    const out = join(tmp.dir, 'atomic.json');
    expect(runCli(['extract', repo, '-o', out, '--no-cache', '--quiet']).code).toBe(0);
    expect(readdirSync(tmp.dir).filter((f) => f.includes('.tmp'))).toEqual([]);
    const piped = runCli(['extract', repo, '-o', '-', '--no-cache', '--quiet']);
    expect(piped.stdout).toBe(readFileSync(out, 'utf8'));
  });
});
