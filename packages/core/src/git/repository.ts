import { existsSync, statSync } from 'node:fs';
import { runGit } from './run-git.js';
import { UsageError, EXIT } from '../util/errors.js';

export interface RepoInfo {
  /** The path as the user gave it. */
  path: string;
  /** The commit id `ref` resolves to. */
  head: string;
  ref: string;
}

/**
 * Check that `path` is a usable git repository and resolve `ref` to a commit. Every failure is
 * a one-line UsageError: no such directory, not a repository, empty repository, shallow clone,
 * unknown ref.
 */
export async function openRepository(path: string, ref = 'HEAD'): Promise<RepoInfo> {
  if (!existsSync(path) || !statSync(path).isDirectory()) {
    throw new UsageError(`${path}: no such directory`, EXIT.failure);
  }
  // the usual case in one git process (each process costs a fork of this one); the failures
  // are told apart by the separate questions below
  const quick = await runGit(path, ['rev-parse', '--is-shallow-repository', '--verify', '--quiet', '--end-of-options', `${ref}^{commit}`]);
  if (quick.code === 0) {
    const [shallow, head] = quick.stdout.trim().split('\n');
    if (shallow === 'false' && head && /^[0-9a-f]{40,64}$/.test(head)) return { path, head, ref };
  }
  const probe = await runGit(path, ['rev-parse', '--git-dir', '--is-shallow-repository']);
  if (probe.code !== 0) {
    throw new UsageError(`${path} is not a git repository (git says: ${firstLine(probe.stderr)})`, EXIT.failure);
  }
  const [, shallow] = probe.stdout.trim().split('\n');
  if (shallow === 'true') {
    throw new UsageError(
      `${path} is a shallow clone, so its history is incomplete; deepen it first with \`git -C ${path} fetch --unshallow\``,
      EXIT.failure,
    );
  }
  const resolved = await runGit(path, ['rev-parse', '--verify', '--quiet', '--end-of-options', `${ref}^{commit}`]);
  if (resolved.code !== 0) {
    if (ref === 'HEAD') {
      const any = await runGit(path, ['rev-list', '--all', '--max-count=1']);
      if (any.code === 0 && any.stdout.trim() === '') {
        throw new UsageError(`${path} is an empty repository: it has no commits yet`, EXIT.failure);
      }
    }
    throw new UsageError(`unknown ref '${ref}' in ${path}`, EXIT.usage);
  }
  return { path, head: resolved.stdout.trim(), ref };
}

/** Resolve several revisions in one git process; undefined for those that do not resolve. */
export async function resolveRevisions(repo: string, revs: string[]): Promise<Map<string, string | undefined>> {
  const out = new Map<string, string | undefined>();
  if (revs.length === 0) return out;
  for (const rev of revs) {
    // rev-parse stops at the first bad revision, so each is asked on its own line of one batch.
    out.set(rev, undefined);
  }
  const r = await runGit(repo, ['cat-file', '--batch-check=%(objectname) %(objecttype)'], revs.map((v) => `${v}^{commit}`).join('\n') + '\n');
  const lines = r.stdout.split('\n');
  revs.forEach((rev, i) => {
    const line = lines[i] ?? '';
    const [id, type] = line.split(' ');
    if (type === 'commit' && id) out.set(rev, id);
  });
  return out;
}

/** Every commit of the first-parent line of `ref`, oldest first (one git process). */
export async function firstParentLine(repo: string, ref: string): Promise<string[]> {
  const r = await runGit(repo, ['rev-list', '--first-parent', '--reverse', ref]);
  if (r.code !== 0) throw new Error(`git rev-list failed: ${firstLine(r.stderr)}`);
  return r.stdout.split('\n').filter(Boolean);
}

function firstLine(s: string): string {
  return s.trim().split('\n')[0] ?? '';
}
