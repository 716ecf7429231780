import picomatch from 'picomatch';
import type { TreeView } from '../adapter/api.js';
import type { BlobReader } from './blob-reader.js';
import type { RawChange } from './log-pass.js';
import { sortedIndex } from '../util/sorted.js';

/** Paths added or removed in one commit above which the sorted path list is sorted anew rather than edited. */
const RESORT_ABOVE = 64;

/** Regular files only: symbolic links (120000) and submodules (160000) are not schema files. */
export const isRegular = (mode: string): boolean => mode === '100644' || mode === '100755';

/**
 * The watched part of the tree as it stands after each commit of the walk, kept up to date
 * from the raw diffs of the log pass (no checkout, no process per commit).
 */
export class TreeState {
  private readonly files = new Map<string, string>();
  /**
   * The paths, sorted, once asked for. A commit that only changes files keeps the same array; one
   * that adds or removes a few paths gets a new array with them put in or taken out (an array
   * handed out is never changed); more than `RESORT_ABOVE` such paths make it sorted anew.
   */
  private sorted: string[] | null = null;

  apply(changes: readonly RawChange[]): void {
    const files = this.files;
    // the paths that came or went, in order (a path may do both in one commit)
    let moves: Array<[string, boolean]> | null = null;
    const gone = (path: string): void => {
      if (files.delete(path)) (moves ??= []).push([path, false]);
    };
    for (const ch of changes) {
      if (ch.status === 'R') gone(ch.from);
      if (ch.status === 'D') {
        gone(ch.path);
        continue;
      }
      if (isRegular(ch.newMode)) {
        const had = files.has(ch.path);
        files.set(ch.path, ch.newBlob);
        if (!had) (moves ??= []).push([ch.path, true]);
      } else gone(ch.path);
    }
    if (!moves || !this.sorted) return;
    if (moves.length > RESORT_ABOVE) {
      this.sorted = null;
      return;
    }
    const next = this.sorted.slice();
    for (const [path, added] of moves) {
      const i = sortedIndex(next, path);
      const there = next[i] === path;
      if (added && !there) next.splice(i, 0, path);
      else if (!added && there) next.splice(i, 1);
    }
    this.sorted = next;
  }

  get(path: string): string | undefined {
    return this.files.get(path);
  }

  /** Every path and its blob (for a checkpoint of the walk). */
  entries(): Array<[string, string]> {
    return [...this.files.entries()];
  }

  /** Start from the paths and blobs a checkpoint kept. */
  seed(entries: ReadonlyArray<readonly [string, string]>): void {
    for (const [path, blob] of entries) this.files.set(path, blob);
    this.sorted = null;
  }

  paths(): string[] {
    if (!this.sorted) this.sorted = [...this.files.keys()].sort();
    return this.sorted;
  }

  /** A view of this tree for one commit; `reads`, when given, collects the paths and blob ids read through it. */
  view(commit: string, reader: BlobReader, walk?: TreeView['walk'], reads?: Array<[string, string]>): TreeView {
    const files = this.files;
    const self = this;
    return {
      commit,
      ...(walk ? { walk } : {}),
      paths: () => self.paths(),
      has: (p) => files.has(p),
      blob: (p) => files.get(p),
      async read(p) {
        const b = files.get(p);
        if (!b) return undefined;
        reads?.push([p, b]);
        const r = await reader.read(b);
        return r.kind === 'text' ? r.text : undefined;
      },
      under(dir) {
        const prefix = dir === '' || dir === '.' ? '' : dir.replace(/\/+$/, '') + '/';
        const all = self.paths();
        const out: string[] = [];
        for (let i = sortedIndex(all, prefix); i < all.length && all[i]!.startsWith(prefix); i++) out.push(all[i]!);
        return out;
      },
    };
  }
}

/** Whether a user `--path` entry has glob characters (then it is matched, not followed). */
export function isGlob(p: string): boolean {
  return picomatch.scan(p).isGlob;
}

/** Turn picomatch-style globs into git pathspecs (`:(glob)` magic; `**` and `*` mean the same). */
export function toPathspecs(globs: readonly string[]): string[] {
  return globs.map((g) => `:(glob)${g}`);
}

const NODE_MODULES = /(^|\/)node_modules\//;

/**
 * What the log pass asks git for, and the filter that makes it exact. Git matches every entry
 * of every tree a commit changes against every pathspec, and its `:(glob)` matching (and an
 * exclusion) is the dear part of the pass when a directory holds many files (1,500 migrations:
 * 1.25 s with glob pathspecs, 0.75 s with plain ones, measured on the Knex benchmark). So a glob
 * that is a double star, a slash and a NAME (no slash, no braces in NAME) goes to git as the plain
 * pathspec `*NAME` (git's `*` also crosses slashes, so it selects more, never less), and what git lists
 * is filtered here with the globs themselves, node_modules left out. With `exact`, the glob
 * pathspecs and the exclusion go to git and nothing is filtered (for rename detection, whose
 * candidates the pathspecs limit).
 */
export function logSelection(globs: readonly string[], exact: boolean): { pathspecs: string[]; keep: ((path: string) => boolean) | null } {
  if (exact) return { pathspecs: [...toPathspecs(globs), ':(exclude,glob)**/node_modules/**'], keep: null };
  const pathspecs = globs.map((g) => {
    const m = /^\*\*\/([^/{}()!+@]+)$/.exec(g);
    if (!m || m[1]!.includes('**')) return `:(glob)${g}`;
    return m[1]!.startsWith('*') ? m[1]! : `*${m[1]}`;
  });
  const match = matcher(globs);
  // pathspecs that all start with a wildcard prune no directory: git then matches every entry
  // of every tree a commit changes against them, dearer than listing every change and
  // filtering here (measured on the Knex benchmark's log: `*.*[jt]s` 680–810 ms, none 460–550 ms)
  const prunes = pathspecs.some((p) => !p.startsWith('*'));
  return { pathspecs: prunes ? pathspecs : [], keep: (path) => !NODE_MODULES.test(path) && match(path) };
}

export function matcher(globs: readonly string[]): (path: string) => boolean {
  if (globs.length === 0) return () => false;
  return picomatch(globs as string[], { dot: true });
}

/**
 * The paths of a tree that `--path` entries select (`paths`, sorted): those a glob matches, and
 * each literal entry as a file or as a directory (everything under it). Of them, `nested`
 * (sorted, present when there are any): those selected only because they lie in a subdirectory
 * of a literal directory entry, which neither a glob nor a literal file names. The fields of
 * `LocateRequest` of those names.
 */
export function userSelection(view: TreeView, globMatch: (p: string) => boolean, literals: readonly string[]): { paths: string[]; nested?: string[] } {
  const selected = new Set<string>();
  for (const p of view.paths()) if (globMatch(p)) selected.add(p);
  const deep = new Set<string>();
  for (const n of literals) {
    if (view.has(n)) selected.add(n);
    for (const p of view.under(n)) {
      if (selected.has(p)) continue;
      if (p.lastIndexOf('/') > n.length) deep.add(p);
      else selected.add(p);
    }
  }
  // a path nested under one directory entry may be a direct child of another, or named otherwise
  for (const p of selected) deep.delete(p);
  for (const p of deep) selected.add(p);
  return { paths: [...selected].sort(), ...(deep.size > 0 ? { nested: [...deep].sort() } : {}) };
}
