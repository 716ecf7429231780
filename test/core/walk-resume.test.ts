// A run with a cache directory keeps its log and locate passes (the walk checkpoint), and the next
// run over the same repository logs and locates only the commits after that head. Checked
// against a run without any cache, byte for byte: after commits are appended (one by one and
// several at once, touching the schema or not), with no new commit, after the branch was rewound
// and rewritten or the checkpoint file damaged (it must not be used), with a revision window,
// with Prisma and with Knex (whose locate step carries state from commit to commit).
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { appendCommits, extractHistory, serialiseDocument, toDocument, GENERATOR, type ExtractRequest, type ScriptedCommit } from '@schema-strata/core';
import prisma from '@schema-strata/adapter-prisma';
import knex from '@schema-strata/adapter-knex';
import { prismaHistoryCommits } from '../../bench/lib/prisma-history.js';
import { day, git, makeRepo, tempDir } from '../helpers/repo.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

const doc = async (req: ExtractRequest): Promise<string> => serialiseDocument(toDocument(await extractHistory(req), GENERATOR));

describe('resuming the walk of the last run', () => {
  it('gives the bytes of an uncached run after commits are appended, one by one and several at once (Prisma)', async () => {
    const { commits } = prismaHistoryCommits({ commits: 90, models: 16, seed: 5 });
    const repo = await makeRepo(tmp.dir, 'prisma', commits.slice(0, 40));
    const cacheDir = join(tmp.dir, 'cache-prisma');
    const first = await extractHistory({ repo, adapter: prisma, cacheDir });
    expect(first.stats.commitsResumed).toBe(0);
    let resumedRuns = 0;
    for (const [from, to] of [[40, 41], [41, 42], [42, 43], [43, 60], [60, 90]] as const) {
      await appendCommits(repo, commits.slice(from, to) as ScriptedCommit[]);
      const h = await extractHistory({ repo, adapter: prisma, cacheDir });
      if (h.stats.commitsResumed > 0) resumedRuns++;
      expect(serialiseDocument(toDocument(h, GENERATOR))).toBe(await doc({ repo, adapter: prisma }));
    }
    expect(resumedRuns).toBe(5);
    // no new commit: everything from the checkpoint
    const again = await extractHistory({ repo, adapter: prisma, cacheDir });
    expect(again.stats.commitsResumed).toBe(again.stats.commitsLogged);
    expect(serialiseDocument(toDocument(again, GENERATOR))).toBe(await doc({ repo, adapter: prisma }));
    // a revision window over a resumed walk
    const mid = git(repo, 'rev-list', '--first-parent', '--skip=30', '-1', 'HEAD').trim();
    const windowed = await extractHistory({ repo, adapter: prisma, cacheDir, until: mid });
    expect(windowed.stats.commitsResumed).toBeGreaterThan(0);
    expect(serialiseDocument(toDocument(windowed, GENERATOR))).toBe(await doc({ repo, adapter: prisma, until: mid }));
  }, 120_000);

  it('walks the whole history again when the branch was rewound and rewritten', async () => {
    const { commits } = prismaHistoryCommits({ commits: 60, models: 12, seed: 8 });
    const repo = await makeRepo(tmp.dir, 'rewritten', commits.slice(0, 50));
    const cacheDir = join(tmp.dir, 'cache-rewritten');
    await extractHistory({ repo, adapter: prisma, cacheDir });
    // back five commits, then other commits on top: the old head is no longer on the line
    git(repo, 'update-ref', 'refs/heads/main', 'main~5');
    await appendCommits(repo, commits.slice(52, 60) as ScriptedCommit[]);
    const h = await extractHistory({ repo, adapter: prisma, cacheDir });
    expect(h.stats.commitsResumed).toBe(0);
    expect(serialiseDocument(toDocument(h, GENERATOR))).toBe(await doc({ repo, adapter: prisma }));
  }, 60_000);

  it('walks the whole history again when the checkpoint file is damaged', async () => {
    const { commits } = prismaHistoryCommits({ commits: 30, models: 8, seed: 9 });
    const repo = await makeRepo(tmp.dir, 'damaged', commits);
    const cacheDir = join(tmp.dir, 'cache-damaged');
    await extractHistory({ repo, adapter: prisma, cacheDir });
    const file = readdirSync(cacheDir).find((f) => f.includes('.walk-'))!;
    expect(file).toBeDefined();
    for (const damage of ['not json', '{"v":1}', JSON.stringify({ ...JSON.parse(readFileSync(join(cacheDir, file), 'utf8')), candidates: null })]) {
      writeFileSync(join(cacheDir, file), damage);
      const h = await extractHistory({ repo, adapter: prisma, cacheDir });
      expect(h.stats.commitsResumed).toBe(0);
      expect(serialiseDocument(toDocument(h, GENERATOR))).toBe(await doc({ repo, adapter: prisma }));
    }
  }, 60_000);

  it('gives the bytes of an uncached run for Knex, whose locate step carries state along the walk', async () => {
    const mig = (t: string, extra = ''): string =>
      `exports.up = async (knex) => { await knex.schema.createTable('${t}', (t) => { t.increments('id'); t.string('label', 40);${extra} }); };\nexports.down = async () => {};\n`;
    const knexfile = (dirs: string[]): string => `module.exports = { client: 'pg', migrations: { directory: ${JSON.stringify(dirs)} } };\n`;
    const steps: Array<ScriptedCommit['files']> = [
      { 'package.json': '{ "dependencies": { "knex": "^3.1.0" } }\n', 'knexfile.js': knexfile(['./db/migrations']), 'db/migrations/001_tools.js': mig('tools') },
      { 'db/migrations/002_members.js': mig('members') },
      { 'src/app.ts': 'export const app = 1;\n' },
      { 'db/migrations/003_loans.js': mig('loans') },
      { 'db/migrations/001_tools.js': mig('tools', " t.text('note');") },
      { 'db/migrations/002_members.js': null },
      { 'knexfile.js': knexfile(['./db/migrations', './db/more']) },
      { 'db/more/004_badges.js': mig('badges') },
      { 'db/migrations/005_kits.js': mig('kits') },
    ];
    const commits: ScriptedCommit[] = steps.map((files, i) => ({ date: day(i * 3), message: `step ${i}`, files }));
    for (const split of [2, 4, 6]) {
      const repo = await makeRepo(tmp.dir, `knex-${split}`, commits.slice(0, split));
      const cacheDir = join(tmp.dir, `cache-knex-${split}`);
      await extractHistory({ repo, adapter: knex, cacheDir });
      for (let k = split; k < commits.length; k++) {
        await appendCommits(repo, [commits[k]!]);
        const h = await extractHistory({ repo, adapter: knex, cacheDir });
        expect(h.stats.commitsResumed).toBeGreaterThan(0);
        expect(serialiseDocument(toDocument(h, GENERATOR))).toBe(await doc({ repo, adapter: knex }));
      }
    }
  }, 120_000);
});
