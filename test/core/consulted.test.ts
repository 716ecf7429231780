// An adapter whose assembly reads the files its locate step consulted (readsConsulted) gets their
// facts as AssembleInput.consulted, from the history walk and from schemaAt alike. A consulted
// file still makes no version of its own; an assembly's cache key holds it, so that a version
// with the same files as an earlier one but another consulted file is assembled anew; and a run
// from the disk cache gives the bytes of a run without it. Checked with a small adapter of this
// test: each line of the schema files is a table, named with the prefix that a consulted file
// gives, so every expectation can be read off the scripted commits.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { extractHistory, schemaAt, serialiseDocument, toDocument, GENERATOR, type SchemaAdapter, type ScriptedCommit } from '@schema-strata/core';
import { day, git, makeRepo, tempDir } from '../helpers/repo.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

interface Facts {
  lines: string[];
}

const prefixed: SchemaAdapter<Facts> = {
  name: 'prefixed-lines',
  version: '1.0.0',
  description: 'each line of schema/*.txt is a table, named with the prefix in prefix.txt',
  watch: ['schema/**', 'prefix.txt'],
  readsConsulted: true,
  locate: (tree) => ({
    files: tree.under('schema'),
    consulted: tree.has('prefix.txt') ? ['prefix.txt'] : [],
  }),
  parseFile: (file) => ({ ok: true, facts: { lines: file.text.split('\n').filter(Boolean) } }),
  assemble: (input) => {
    const prefix = input.consulted?.find((f) => f.path === 'prefix.txt')?.facts?.lines[0] ?? '';
    const names = input.files.flatMap((f) => f.facts?.lines ?? []);
    return {
      snapshot: {
        tables: names.map((n) => ({
          name: `${prefix}${n}`, kind: 'table' as const, primaryKey: ['id'], foreignKeys: [], uniques: [],
          columns: [{ name: 'id', type: { kind: 'integer' as const }, nativeType: 'integer', nullable: false }],
        })),
      },
      diagnostics: [],
    };
  },
};

const tablesAt = (h: Awaited<ReturnType<typeof extractHistory>>, i: number): string[] =>
  h.snapshots.get(h.versions[i]!.snapshot!)!.tables.map((t) => t.table.name).sort();

describe('consulted files an assembly reads', () => {
  it('reach the assembly, make no version, key the cache, and come out the same from the disk cache', async () => {
    const commits: ScriptedCommit[] = [
      { date: day(0), message: 'tools', files: { 'schema/a.txt': 'tools\n', 'prefix.txt': 'coop_\n' } },
      { date: day(1), message: 'another prefix', files: { 'prefix.txt': 'lend_\n' } },
      { date: day(2), message: 'loans', files: { 'schema/a.txt': 'tools\nloans\n' } },
      // the files of the first version again, under the second prefix
      { date: day(3), message: 'no loans', files: { 'schema/a.txt': 'tools\n' } },
    ];
    const repo = await makeRepo(tmp.dir, 'consulted', commits);
    const h = await extractHistory({ repo, adapter: prefixed });
    expect(h.versions.map((v) => v.subject)).toEqual(['tools', 'loans', 'no loans']);
    expect(tablesAt(h, 0)).toEqual(['coop_tools']);
    expect(tablesAt(h, 1)).toEqual(['lend_loans', 'lend_tools']);
    expect(tablesAt(h, 2)).toEqual(['lend_tools']);
    expect(h.stats.assembled).toBe(3);
    const head = git(repo, 'rev-parse', 'HEAD').trim();
    expect((await schemaAt({ repo, ref: head, adapter: prefixed })).tables.map((t) => t.name)).toEqual(['lend_tools']);
    const cacheDir = mkdtempSync(join(tmpdir(), 'strata-consulted-cache-'));
    try {
      const bytes = async (req: Partial<Parameters<typeof extractHistory>[0]>) => serialiseDocument(toDocument(await extractHistory({ repo, adapter: prefixed, ...req }), GENERATOR));
      const cold = await bytes({});
      expect(await bytes({ cacheDir })).toBe(cold);
      expect(await bytes({ cacheDir })).toBe(cold);
    } finally {
      rmSync(cacheDir, { recursive: true, force: true });
    }
  }, 60_000);
});
