import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeFileAtomic } from '../util/atomic-write.js';

/** Folder of the output directory that holds one small state file per project. */
export const STATE_DIR = '.study-state';

/**
 * What a study remembers of one project between runs (`DIR/.study-state/<label>.json`), so that a
 * re-run skips it when nothing that decides its result has changed. `key` is the hash of those
 * inputs: the repository's head commit, the ref, window, paths, adapter (name, version, source)
 * and its options, the file size limit, the analysis options and schema-strata's version.
 */
export interface ProjectState {
  label: string;
  key: string;
  head: string;
  status: 'done' | 'failed';
  /** Why it failed. */
  reason?: string;
  /** The project's interchange file (done), its SHA-256 and a few figures for the summary. */
  result?: { file: string; sha256: string; versions: number; tables: number; changes: number; errors: number };
}

export const resultFileOf = (dir: string, label: string): string => join(dir, `${label}.json`);
export const stateFileOf = (dir: string, label: string): string => join(dir, STATE_DIR, `${label}.json`);

export function sha256(data: string | Uint8Array): string {
  return createHash('sha256').update(data).digest('hex');
}

/** The state of a project, or undefined when there is none or it cannot be read. */
export function readState(dir: string, label: string): ProjectState | undefined {
  const f = stateFileOf(dir, label);
  if (!existsSync(f)) return undefined;
  try {
    const s = JSON.parse(readFileSync(f, 'utf8')) as ProjectState;
    return s && s.label === label && typeof s.key === 'string' ? s : undefined;
  } catch {
    return undefined;
  }
}

/** Write a project's state (atomically; after its result, so that a state never names a missing result). */
export function writeState(dir: string, s: ProjectState): void {
  writeFileAtomic(stateFileOf(dir, s.label), JSON.stringify(s, null, 2) + '\n');
}

/** True when a `done` state's result file is still there with the same content. */
export function resultIntact(dir: string, s: ProjectState): boolean {
  if (s.status !== 'done' || !s.result) return false;
  const f = join(dir, s.result.file);
  if (!existsSync(f)) return false;
  return sha256(readFileSync(f)) === s.result.sha256;
}
