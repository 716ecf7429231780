// The build parses the files of the versions ahead as soon as git hands them over
// (ExtractRequest.parseAhead, on by default), not when it reaches their version. Facts depend on
// the text alone, so the output must not change: checked byte for byte against runs with
// `parseAhead: false`, over Knex and TypeORM histories that append, edit, delete and break files
// (a syntax error keeps its last good parse), with a revision window; the order of the adapter's
// calls shows that files were parsed ahead, and each distinct blob is parsed once either way. An
// adapter whose parse throws fails the run with the same error whether the throw came ahead or not.
import { afterAll, describe, expect, it } from 'vitest';
import { extractHistory, serialiseDocument, toDocument, GENERATOR, type ExtractRequest, type SchemaAdapter, type ScriptedCommit } from '@schema-strata/core';
import knexAdapter from '@schema-strata/adapter-knex';
import typeormAdapter from '@schema-strata/adapter-typeorm';
import { day, git, makeRepo, tempDir } from '../helpers/repo.js';
import { knexMigration as mig, knexSteps, typeormEntity, typeormSteps } from '../helpers/sources.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

const doc = async (req: ExtractRequest): Promise<string> => serialiseDocument(toDocument(await extractHistory(req), GENERATOR));

/** The adapter with its parse and assemble calls written to `log`, in the order they came. */
function recording(adapter: SchemaAdapter, log: string[]): SchemaAdapter {
  let assembled = 0;
  return {
    ...adapter,
    parseFile: async (file, options) => {
      log.push(`parse ${file.path}`);
      return adapter.parseFile!(file, options);
    },
    createSession: (options) => {
      const s = adapter.createSession!(options);
      return { assemble: (input) => (log.push(`assemble ${assembled++}`), s.assemble(input)) };
    },
  };
}

describe('parsing ahead of the versions', () => {
  it('gives the bytes of a build that parses each file in its turn (Knex)', async () => {
    const files = knexSteps(120, 'loans', (i, step) => {
      // a syntax error, mended two commits later
      if (i === 50) step['db/migrations/000_tools.js'] = 'exports.up = async (knex) => { await knex.schema.createTable(\n';
      if (i === 52) step['db/migrations/000_tools.js'] = mig('tools', " t.boolean('lent');");
    });
    const commits: ScriptedCommit[] = files.map((f, i) => ({ date: day(i), message: `step ${i}`, files: f }));
    const repo = await makeRepo(tmp.dir, 'knex', commits);
    const ahead: string[] = [];
    const inTurn: string[] = [];
    const h = await extractHistory({ repo, adapter: recording(knexAdapter, ahead) });
    const g = await extractHistory({ repo, adapter: recording(knexAdapter, inTurn), parseAhead: false });
    expect(serialiseDocument(toDocument(h, GENERATOR))).toBe(serialiseDocument(toDocument(g, GENERATOR)));
    expect(h.versions.some((v) => v.status === 'partial')).toBe(true);
    // each distinct blob once, either way; most of them parsed ahead
    expect(h.stats.filesParsed).toBe(g.stats.filesParsed);
    expect(ahead.filter((e) => e.startsWith('parse')).length).toBe(h.stats.filesParsed);
    expect(h.stats.filesParsedAhead).toBeGreaterThan(100);
    expect(g.stats.filesParsedAhead).toBe(0);
    // ahead: the migration of version 100 was parsed before version 60 was assembled; in turn: after
    const before = (log: string[], a: string, b: string) => log.indexOf(a) < log.indexOf(b);
    expect(before(ahead, 'parse db/migrations/100_loans100.js', 'assemble 60')).toBe(true);
    expect(before(inTurn, 'parse db/migrations/100_loans100.js', 'assemble 60')).toBe(false);
    const mid = git(repo, 'rev-list', '--first-parent', '--skip=40', '-1', 'HEAD').trim();
    expect(await doc({ repo, adapter: knexAdapter, since: mid })).toBe(await doc({ repo, adapter: knexAdapter, since: mid, parseAhead: false }));
  }, 120_000);

  it('gives the bytes of a build that parses each file in its turn (TypeORM)', async () => {
    // as the read-ahead test's history, with Loan broken by a syntax error at 41
    const files = typeormSteps((i, s) => {
      if (i === 41) s['src/entity/Loan.ts'] = `${typeormEntity('Loan')}\n@Entity(\n`;
    });
    const commits: ScriptedCommit[] = files.map((f, i) => ({ date: day(i), message: `step ${i}`, files: f }));
    const repo = await makeRepo(tmp.dir, 'typeorm', commits);
    const h = await extractHistory({ repo, adapter: typeormAdapter });
    const g = await extractHistory({ repo, adapter: typeormAdapter, parseAhead: false });
    expect(serialiseDocument(toDocument(h, GENERATOR))).toBe(serialiseDocument(toDocument(g, GENERATOR)));
    expect(h.stats.filesParsed).toBe(g.stats.filesParsed);
    expect(h.stats.filesParsedAhead).toBeGreaterThan(40);
  }, 120_000);

  it('fails with the same error when the adapter throws, ahead or not', async () => {
    const commits: ScriptedCommit[] = [
      { date: day(0), message: 'tools', files: { 'package.json': '{}\n', 'db/migrations/001_tools.js': mig('tools') } },
      ...Array.from({ length: 30 }, (_, i) => ({ date: day(i + 1), message: `step ${i}`, files: { [`db/migrations/${String(i + 2).padStart(3, '0')}_m.js`]: i === 20 ? '// the repairs table\n' : mig(`m${i}`) } })),
    ];
    const repo = await makeRepo(tmp.dir, 'knex-throws', commits);
    let calls = 0;
    const throwing: SchemaAdapter = {
      ...knexAdapter,
      parseFile: (file, options) => {
        calls++;
        if (file.text.includes('repairs')) throw new Error(`cannot parse ${file.path}`);
        return knexAdapter.parseFile!(file, options);
      },
    };
    await expect(extractHistory({ repo, adapter: throwing })).rejects.toThrow('cannot parse db/migrations/022_m.js');
    const ahead = calls;
    calls = 0;
    await expect(extractHistory({ repo, adapter: throwing, parseAhead: false })).rejects.toThrow('cannot parse db/migrations/022_m.js');
    // ahead, the throwing file was parsed twice: once ahead (the error set aside), once in its turn
    expect(ahead).toBeGreaterThan(calls);
  }, 120_000);
});
