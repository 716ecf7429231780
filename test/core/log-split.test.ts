// A long first-parent line is logged in two parts at once (logPass, LOG_SPLIT_MIN). Checked
// against one git log over the whole line: the same commits in the same order with the same
// changes, over a history with merges (whose diffs are against the first parent), deletions and
// a rename, with and without a pathspec, with rename detection, with the filter of the log
// selection, with progress counts, and for a range (never split). The stream of the same pass
// (logStream, which the extraction locates as git writes it) hands over commits before git is
// done, in both forms, and ends with the same list; a git that fails makes it reject.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { logPass, logStream } from '../../packages/core/src/git/log-pass.js';
import type { ScriptedCommit } from '@schema-strata/core';
import { day, git, makeRepo, tempDir } from '../helpers/repo.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

describe('the log pass in two parts', () => {
  it('lists what one git log lists', async () => {
    const commits: ScriptedCommit[] = [];
    for (let i = 0; i < 60; i++) {
      const files: ScriptedCommit['files'] = { [`db/migrations/${String(i).padStart(3, '0')}.js`]: `exports.n = ${i};\n` };
      if (i % 7 === 3) files['src/app.ts'] = `export const v = ${i};\n`;
      if (i % 11 === 5) files[`db/migrations/${String(i - 3).padStart(3, '0')}.js`] = null;
      commits.push({ date: day(i), message: `step ${i}`, files });
    }
    commits.push({ date: day(61), message: 'rename', files: { 'src/app.ts': null, 'src/main.ts': 'export const v = 59;\n' } });
    const repo = await makeRepo(tmp.dir, 'split', commits);
    // merges whose side branches change files: their changes show at the merge, against the first parent
    const who = ['-c', 'user.name=Test', '-c', 'user.email=test@example.org'];
    const before = { ...process.env };
    try {
      for (let i = 0; i < 4; i++) {
        process.env.GIT_AUTHOR_DATE = day(100 + i);
        process.env.GIT_COMMITTER_DATE = day(100 + i);
        git(repo, 'checkout', '-q', '-b', `side${i}`, 'main~2');
        writeFileSync(join(repo, 'db', `side${i}.js`), `exports.side = ${i};\n`);
        git(repo, 'add', 'db');
        git(repo, ...who, 'commit', '-q', '-m', `side ${i}`);
        git(repo, 'checkout', '-q', 'main');
        git(repo, ...who, 'merge', '-q', '--no-ff', '-m', `merge side ${i}`, `side${i}`);
        git(repo, ...who, 'rm', '-q', `db/migrations/0${50 + i}.js`);
        git(repo, ...who, 'commit', '-q', '-m', `drop ${50 + i}`);
      }
    } finally {
      process.env = before;
    }
    const head = git(repo, 'rev-parse', 'main').trim();
    const lineLength = git(repo, 'rev-list', '--first-parent', '--count', 'main').trim();
    expect(Number(lineLength)).toBeGreaterThan(60);

    const keep = (p: string): boolean => p.startsWith('db/');
    for (const [pathspecs, opts] of [
      [[], {}],
      [['db'], {}],
      [[], { keep }],
      [['src', 'db'], { renames: true }],
    ] as const) {
      const whole = await logPass(repo, head, [...pathspecs], undefined, { ...opts, splitAt: Infinity });
      const ticks: number[] = [];
      const parts = await logPass(repo, head, [...pathspecs], (n) => ticks.push(n), { ...opts, splitAt: 10 });
      expect(parts).toEqual(whole);
      expect(ticks[ticks.length - 1]).toBe(whole.length);
      expect(whole.some((c) => c.parents.length > 1)).toBe(true);
    }
    // a range is logged by one process
    const from = git(repo, 'rev-parse', 'main~20').trim();
    expect(await logPass(repo, `${from}..${head}`, [], undefined, { splitAt: 10 })).toEqual(await logPass(repo, `${from}..${head}`, [], undefined, { splitAt: Infinity }));
  }, 60_000);

  it('hands the log over as git writes it', async () => {
    // wide commits, so that git's output comes in many pieces
    const commits: ScriptedCommit[] = [];
    for (let i = 0; i < 240; i++) {
      const files: ScriptedCommit['files'] = {};
      for (let k = 0; k < 24; k++) files[`db/migrations/${String(k).padStart(2, '0')}/a-long-directory-name/${String(i).padStart(4, '0')}.js`] = `exports.n = ${i * 100 + k};\n`;
      commits.push({ date: day(i), message: `step ${i}`, files });
    }
    const repo = await makeRepo(tmp.dir, 'stream', commits);
    const whole = await logPass(repo, 'main', [], undefined, { splitAt: Infinity });
    expect(whole).toHaveLength(240);
    for (const splitAt of [Infinity, 100]) {
      const stream = logStream(repo, 'main', [], undefined, { splitAt });
      const seen: number[] = [];
      while (await stream.more()) seen.push(stream.commits.length);
      expect(stream.commits).toEqual(whole);
      // more than one hand-over, each with more commits than the last, the first well before the end
      expect(seen.length, `splitAt ${splitAt}`).toBeGreaterThan(2);
      expect(seen[0]!).toBeLessThan(120);
      for (let k = 1; k < seen.length; k++) expect(seen[k]!).toBeGreaterThan(seen[k - 1]!);
      expect(seen[seen.length - 1]).toBe(240);
    }
    const broken = logStream(repo, 'no-such-branch', [], undefined, { splitAt: Infinity });
    await expect((async () => {
      while (await broken.more());
    })()).rejects.toThrow(/git log failed/);
  }, 60_000);
});
