import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import type { LoggedCommit } from '../git/log-pass.js';
import { runGit } from '../git/run-git.js';
import type { Diagnostic } from '../model/types.js';
import { writeFileAtomic } from '../util/atomic-write.js';

/** Layout of a walk checkpoint; bump it when it changes (older files are then ignored). */
const WALK_FORMAT = 1;

/** A located version candidate as a checkpoint keeps it: its files as changes from the candidate before. */
export interface CheckpointCandidate {
  pos: number;
  /** Paths added or given another blob since the candidate before, with their blobs. */
  add: Array<[string, string]>;
  /** Paths the candidate before had and this one has not. */
  del: string[];
  consulted: Array<[string, string]>;
  diagnostics: Diagnostic[];
}

/**
 * The log and locate passes of a run, as they stood at its head, kept in the cache directory so
 * that the next run over the same repository and selection logs and locates only the commits
 * after that head (when the head is still on the first-parent line of the new one).
 */
export interface WalkCheckpoint {
  v: number;
  key: string;
  head: string;
  /** The logged commits, oldest first. */
  commits: LoggedCommit[];
  /** The watched paths and their blobs after the last logged commit. */
  tree: Array<[string, string]>;
  candidates: CheckpointCandidate[];
  /** The paths the adapter located at the last logged commit, sorted. */
  lastPaths: string[];
  ambiguous: string[][];
  ambiguousHint: string;
  unsupported?: string;
  searched?: string;
}

/** The file of a checkpoint: one per cache namespace and walk key, replaced by every run. */
export function checkpointFile(cacheDir: string, namespace: string, keyHash: string): string {
  return join(cacheDir, `${namespace}.walk-${keyHash}.json`);
}

/** The checkpoint in `file` when it is one of this format and key; else undefined (a torn or old file too). */
export async function readCheckpoint(file: string, key: string): Promise<WalkCheckpoint | undefined> {
  try {
    const c = JSON.parse(await readFile(file, 'utf8')) as WalkCheckpoint;
    const lists = c && [c.commits, c.tree, c.candidates, c.lastPaths, c.ambiguous].every((x) => Array.isArray(x));
    return lists && c.v === WALK_FORMAT && c.key === key && typeof c.head === 'string' && typeof c.ambiguousHint === 'string' ? c : undefined;
  } catch {
    return undefined;
  }
}

/** Write a checkpoint; a cache directory that cannot take it costs only the next run's speed. */
export function writeCheckpoint(file: string, c: Omit<WalkCheckpoint, 'v'>): void {
  try {
    writeFileAtomic(file, JSON.stringify({ v: WALK_FORMAT, ...c }));
  } catch {
    // the run goes on without it
  }
}

/**
 * Whether commit `old` is on the first-parent line of `head` (then the commits after it on
 * that line are exactly the first-parent commits of `old..head`, the oldest having `old` as
 * its first parent). A rewritten or rewound history gives false.
 */
export async function onFirstParentLine(repo: string, old: string, head: string): Promise<boolean> {
  if (old === head) return true;
  const r = await runGit(repo, ['rev-list', '--first-parent', '--parents', `${old}..${head}`]);
  if (r.code !== 0) return false;
  const lines = r.stdout.split('\n').filter(Boolean);
  const oldest = lines[lines.length - 1];
  return oldest !== undefined && oldest.split(' ')[1] === old;
}
