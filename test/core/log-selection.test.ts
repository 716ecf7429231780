// The log pass asks git for plain pathspecs that select more than the adapters' watch globs and
// filters what git lists (logSelection). Checked against git itself: the commits and changes
// must be exactly those that git's own glob pathspecs (with the node_modules exclusion) select.
import { afterAll, describe, expect, it } from 'vitest';
import { logSelection } from '../../packages/core/src/git/tree-state.js';
import { logPass } from '../../packages/core/src/git/log-pass.js';
import type { ScriptedCommit } from '@schema-strata/core';
import { day, makeRepo, tempDir } from '../helpers/repo.js';

const tmp = tempDir();
afterAll(() => tmp.cleanup());

const WATCH = ['**/*.*[jt]s', '**/package.json', '**/prisma.config.ts', '**/*.prisma', 'db/**/*.sql'];

describe('the log selection', () => {
  it('lists the same commits and changes as git with glob pathspecs', async () => {
    const paths = [
      'package.json', 'apps/web/package.json', 'apps/web/mypackage.json', 'node_modules/x/index.js', 'apps/node_modules/y/a.ts',
      'src/a.ts', 'src/b.tsx', 'src/c.d.ts', '.eslintrc.js', 'src/readme_js', 'src/dir.js/inner.txt', 'prisma/schema.prisma',
      'prisma/prisma.config.ts', 'db/seed/one.sql', 'other/one.sql', 'README.md', 'docs/notes.txt', 'src/deep/x/y/z.mjs',
    ];
    const commits: ScriptedCommit[] = paths.map((p, i) => ({ date: day(i), message: `add ${p}`, files: { [p]: `content ${i}\n` } }));
    // a commit that changes several at once, one that only touches node_modules, one that deletes
    commits.push({ date: day(40), message: 'several', files: { 'src/a.ts': 'two\n', 'README.md': 'two\n', 'node_modules/x/index.js': 'two\n' } });
    commits.push({ date: day(41), message: 'vendored', files: { 'node_modules/x/index.js': 'three\n' } });
    commits.push({ date: day(42), message: 'delete', files: { 'src/c.d.ts': null } });
    const repo = await makeRepo(tmp.dir, 'selection', commits);

    const run = async (exact: boolean, watch: readonly string[] = WATCH) => {
      const sel = logSelection(watch, exact);
      const got = await logPass(repo, 'HEAD', sel.pathspecs, undefined, sel.keep ? { keep: sel.keep } : {});
      return got.map((c) => ({ subject: c.subject, changes: c.changes.map((ch) => `${ch.status} ${ch.path}`) }));
    };
    const exact = await run(true);
    const loose = await run(false);
    expect(loose).toEqual(exact);
    // globs that all start with a wildcard: git gets no pathspec, the filter does all the selection
    const broad = WATCH.filter((g) => g.startsWith('**/'));
    expect(logSelection(broad, false).pathspecs).toEqual([]);
    expect(await run(false, broad)).toEqual(await run(true, broad));
    expect((await run(true, broad)).length).toBeGreaterThan(5);
    // and the selection is what the globs say
    const listed = new Set(exact.flatMap((c) => c.changes.map((x) => x.slice(2))));
    for (const p of ['package.json', 'apps/web/package.json', 'src/a.ts', 'src/c.d.ts', '.eslintrc.js', 'prisma/schema.prisma', 'prisma/prisma.config.ts', 'db/seed/one.sql', 'src/deep/x/y/z.mjs']) {
      expect(listed.has(p), p).toBe(true);
    }
    for (const p of ['src/b.tsx', 'apps/web/mypackage.json', 'node_modules/x/index.js', 'apps/node_modules/y/a.ts', 'src/readme_js', 'src/dir.js/inner.txt', 'other/one.sql', 'README.md']) {
      expect(listed.has(p), p).toBe(false);
    }
    expect(exact.map((c) => c.subject)).not.toContain('vendored');
    expect(exact.find((c) => c.subject === 'delete')?.changes).toEqual(['D src/c.d.ts']);
  });

  it('asks git for plain pathspecs where a glob allows it', () => {
    // (with one that prunes directories; without one, none at all: see above)
    expect(logSelection(['**/*.ts', 'db/**/*.sql', '**/{a,b}.js'], false).pathspecs).toEqual(['*.ts', ':(glob)db/**/*.sql', ':(glob)**/{a,b}.js']);
  });
});
