/**
 * The file references of one commit's located paths, carried from the last commit's during the
 * history walk. Consecutive commits locate nearly the same files, and an adapter that carries its
 * result forward hands back the very same path strings in the same order: then each path costs a
 * pointer comparison with the last commit's path at the same place, and strings are compared only
 * around paths that came, went or moved.
 */
import type { FileRef } from './engine.js';
import { sortedIndex, sortedUnique } from '../util/sorted.js';

/** One commit's located paths (sorted, without duplicates) and their references (undefined: not in its tree). */
export interface LocatedRefs {
  readonly paths: readonly string[];
  readonly refs: ReadonlyArray<FileRef | undefined>;
}

export const NO_LOCATED: LocatedRefs = { paths: [], refs: [] };

/**
 * The references of `located` (the adapter's paths, in any order, possibly repeated) at a commit
 * that changed the paths `changed` since the commit of `last`: a path `last` also located, and
 * that this commit did not change, keeps its reference; every other one is looked up. `files`
 * lists the references that exist, in path order.
 */
export function locatedRefs(
  located: readonly string[],
  last: LocatedRefs,
  changed: readonly string[],
  lookup: (path: string) => FileRef | undefined,
): LocatedRefs & { files: FileRef[] } {
  const n = located.length;
  const lastPaths = last.paths;
  const lastRefs = last.refs;
  const paths = new Array<string>(n);
  const refs = new Array<FileRef | undefined>(n);
  let j = 0;
  for (let k = 0; k < n; k++) {
    const p = located[k]!;
    let m = -1;
    if (lastPaths[j] === p) m = j;
    else {
      while (j < lastPaths.length && lastPaths[j]! < p) j++;
      if (lastPaths[j] === p) m = j;
    }
    // order: a path found in `last` comes after its neighbour, since the walk through `last` only
    // goes forward (past every path of `last` below the neighbour, or past the neighbour itself)
    if (k > 0 && m < 0 && !(located[k - 1]! < p)) {
      // not sorted, or repeated: again from the sorted list (which passes this check)
      return locatedRefs(sortedUnique(located), last, changed, lookup);
    }
    paths[k] = p;
    if (m >= 0) {
      refs[k] = lastRefs[m];
      j = m + 1;
    } else refs[k] = lookup(p);
  }
  // the changed paths among them have a new blob, or none
  for (const c of changed) {
    const at = sortedIndex(paths, c);
    if (paths[at] === c) refs[at] = lookup(c);
  }
  const files: FileRef[] = [];
  for (const r of refs) if (r) files.push(r);
  return { paths, refs, files };
}
