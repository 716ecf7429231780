import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, renameSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { spawn } from 'node:child_process';
import { gitEnv } from '../git/run-git.js';

/** Where the clone of a URL lives: `<dir>/<readable name>-<hash of the URL>.git`. */
export function clonePathOf(url: string, dir: string): string {
  const name = url.replace(/\.git$/i, '').split(/[/:]/).filter(Boolean).slice(-2).join('-').replace(/[^A-Za-z0-9._-]+/g, '-').slice(0, 60);
  const hash = createHash('sha256').update(url).digest('hex').slice(0, 12);
  return join(dir, `${name || 'repository'}-${hash}.git`);
}

function git(args: string[], cwd?: string): Promise<{ code: number; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn('git', args, { cwd, env: gitEnv(), stdio: ['ignore', 'ignore', 'pipe'] });
    const err: Buffer[] = [];
    child.stderr.on('data', (b: Buffer) => err.push(b));
    child.on('error', (e) => resolve({ code: 1, stderr: e.message }));
    child.on('close', (code) => resolve({ code: code ?? 1, stderr: Buffer.concat(err).toString('utf8') }));
  });
}

const lastLine = (s: string): string => s.trim().split('\n').filter((l) => !/^(remote: |Cloning|warning: )/.test(l)).pop() ?? '';

/**
 * A local copy with full history of the repository at `url`, in `dir` (the clone cache): a
 * mirror clone made the first time (into a temporary directory, then renamed, so that an
 * interrupted clone leaves nothing half-made), brought up to date with `git remote update`
 * on later runs unless `update` is false. These are the only network calls of a study, and
 * they go only to the URLs the corpus names. Throws an Error with git's message on failure.
 */
export async function ensureClone(url: string, dir: string, update = true): Promise<string> {
  const target = clonePathOf(url, dir);
  if (existsSync(join(target, 'HEAD'))) {
    if (update) {
      const r = await git(['--git-dir', target, 'remote', 'update', '--prune']);
      if (r.code !== 0) throw new Error(`cannot update the clone of ${url}: ${lastLine(r.stderr) || `git exited with code ${r.code}`}`);
    }
    return target;
  }
  mkdirSync(dir, { recursive: true });
  const tmp = `${target}.${process.pid}.${Math.random().toString(36).slice(2)}.tmp`;
  const r = await git(['clone', '--mirror', '--quiet', '--', url, tmp]);
  if (r.code !== 0) {
    rmSync(tmp, { recursive: true, force: true });
    throw new Error(`cannot clone ${url}: ${lastLine(r.stderr) || `git exited with code ${r.code}`}`);
  }
  try {
    renameSync(tmp, target);
  } catch (e) {
    // another process made the same clone meanwhile: keep theirs
    rmSync(tmp, { recursive: true, force: true });
    if (!existsSync(join(target, 'HEAD'))) throw e;
  }
  return target;
}
