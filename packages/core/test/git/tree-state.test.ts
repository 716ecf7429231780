// The watched tree's sorted path list (TreeState.paths), kept up to date from raw diffs: against
// git itself (`git ls-tree -r` of every commit of a real repository with additions, deletions,
// a rename, a commit adding 90 files and one removing 45, and a file turned into a symbolic
// link), and against sorting the present paths anew after every step of seeded random change
// lists, small (the list edited) and large (sorted anew). An array handed out is never changed
// afterwards, and a commit that only changes files keeps the same array.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, symlinkSync, unlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { TreeState } from '../../src/git/tree-state.js';
import { logPass, type RawChange } from '../../src/git/log-pass.js';
import { writeRepository } from '../../src/demo/git-writer.js';

const dir = mkdtempSync(join(tmpdir(), 'strata-tree-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const git = (repo: string, ...args: string[]): string =>
  execFileSync('git', ['-C', repo, ...args], { encoding: 'utf8', env: { ...process.env, GIT_CONFIG_GLOBAL: '/dev/null' } });

/** A small deterministic generator (xorshift), so that a failing list can be replayed. */
function rng(seed: number): () => number {
  let x = seed >>> 0 || 1;
  return () => {
    x ^= x << 13;
    x ^= x >>> 17;
    x ^= x << 5;
    return (x >>> 0) / 2 ** 32;
  };
}

const change = (status: string, path: string, from = path, newMode = '100644'): RawChange =>
  ({ status, path, from, oldMode: '100644', newMode, oldBlob: '0'.repeat(40), newBlob: 'b'.repeat(40) }) as unknown as RawChange;

describe('TreeState.paths', () => {
  it('is the sorted list of regular files git lists at every commit', async () => {
    const repo = join(dir, 'repo');
    const commits = [];
    for (let i = 0; i < 40; i++) {
      const files: Record<string, string | null> = { [`db/migrations/${String(i).padStart(3, '0')}_tools.js`]: `exports.n = ${i};\n` };
      if (i % 5 === 2) files[`db/migrations/${String(i - 2).padStart(3, '0')}_tools.js`] = null;
      if (i % 7 === 3) files[`src/models/Z${i}.ts`] = `export const z = ${i};\n`;
      if (i % 9 === 4) files['src/app.ts'] = `export const v = ${i};\n`;
      if (i === 20) Object.assign(files, { 'src/app.ts': null, 'src/main.ts': 'export const v = 13;\n' });
      if (i === 30) for (let k = 0; k < 90; k++) files[`db/seeds/${k}.js`] = `exports.k = ${k};\n`;
      if (i === 35) for (let k = 0; k < 90; k += 2) files[`db/seeds/${k}.js`] = null;
      commits.push({ date: new Date(Date.UTC(2024, 0, 1 + i)).toISOString().replace('.000Z', '+00:00'), message: `step ${i}`, files });
    }
    await writeRepository(repo, commits, { checkout: true });
    // a file turned into a symbolic link: no longer a regular file
    unlinkSync(join(repo, 'src', 'main.ts'));
    symlinkSync('models', join(repo, 'src', 'main.ts'));
    git(repo, 'add', '-A');
    git(repo, '-c', 'user.name=T', '-c', 'user.email=t@example.org', 'commit', '-q', '-m', 'link');
    const log = await logPass(repo, 'HEAD', [], undefined, { renames: true });
    const tree = new TreeState();
    for (const c of log) {
      tree.apply(c.changes);
      const regular = git(repo, 'ls-tree', '-r', c.commit).split('\n').filter((l) => /^100(644|755) /.test(l)).map((l) => l.slice(l.indexOf('\t') + 1));
      expect([...tree.paths()], c.subject).toEqual(regular.sort());
    }
    expect(log).toHaveLength(41);
    expect(log.some((c) => c.changes.some((ch) => ch.status === 'R'))).toBe(true);
  });

  it('matches the present paths sorted anew after every random step, and never changes an array handed out', () => {
    for (const seed of [1, 7, 42, 2024]) {
      const rnd = rng(seed);
      const tree = new TreeState();
      const present = new Set<string>();
      const pick = (): string => `d${Math.floor(rnd() * 6)}/${Math.floor(rnd() * 3)}/f${Math.floor(rnd() * 60)}.ts`;
      const handed: Array<{ list: string[]; copy: string[] }> = [];
      for (let step = 0; step < 300; step++) {
        const n = rnd() < 0.05 ? 80 + Math.floor(rnd() * 40) : Math.floor(rnd() * 5);
        const changes: RawChange[] = [];
        // a change list as git writes one (each path once), applied to the model as it is made
        const touched = new Set<string>();
        for (let k = 0; k < n; k++) {
          const p = pick();
          if (touched.has(p)) continue;
          touched.add(p);
          const r = rnd();
          if (r < 0.45 || !present.has(p)) {
            changes.push(change(present.has(p) ? 'M' : 'A', p));
            present.add(p);
          } else if (r < 0.7) {
            changes.push(change('D', p));
            present.delete(p);
          } else if (r < 0.85) {
            const to = pick();
            if (touched.has(to) || present.has(to)) continue;
            touched.add(to);
            changes.push(change('R', to, p));
            present.delete(p);
            present.add(to);
          } else {
            changes.push(change('T', p, p, '120000'));
            present.delete(p);
          }
        }
        const before = step % 3 === 0 ? tree.paths() : null;
        tree.apply(changes);
        const now = tree.paths();
        expect(now, `seed ${seed}, step ${step}`).toEqual([...present].sort());
        if (before) handed.push({ list: before, copy: [...before] });
        if (before && changes.every((c) => c.status === 'M')) expect(now).toBe(before);
      }
      for (const h of handed) expect(h.list).toEqual(h.copy);
    }
  });
});
