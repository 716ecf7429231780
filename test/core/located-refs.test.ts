// The located files of a commit are carried from the last commit's by comparing path strings at
// the same place, and paths are looked up only where the list or the tree changed. Checked
// against the plain way (sort, drop repeats, look every path up) over a random walk whose tree
// adds, deletes and changes files, and whose located lists keep, add, drop, repeat and reorder
// paths, some as new string objects of the same text; and the lookups counted where the adapter
// hands the same strings back.
import { describe, expect, it } from 'vitest';
import type { FileRef } from '../../packages/core/src/history/engine.js';
import { locatedRefs, NO_LOCATED, type LocatedRefs } from '../../packages/core/src/history/located-refs.js';
import { SetKeys } from '../../packages/core/src/history/set-key.js';

/** A small deterministic generator (a linear congruential one; enough for test inputs). */
function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

/** The plain way: every located path sorted, once, and looked up. */
function plain(located: readonly string[], tree: Map<string, string>, keys: SetKeys) {
  const paths = [...new Set(located)].sort();
  const refs = paths.map((p) => (tree.has(p) ? keys.ref(p, tree.get(p)!) : undefined));
  return { paths, refs, files: refs.filter((r): r is FileRef => r !== undefined) };
}

describe('located files carried from commit to commit', () => {
  it('gives what sorting and looking up every path gives, over a random walk', () => {
    const rnd = lcg(7);
    const names = Array.from({ length: 60 }, (_, i) => `migrations/2024${String(i).padStart(4, '0')}_step.js`);
    const tree = new Map<string, string>();
    const keys = new SetKeys();
    let last: LocatedRefs = NO_LOCATED;
    let located: string[] = [];
    let blobNo = 0;
    const kinds = new Set<string>();
    for (let step = 0; step < 600; step++) {
      // the commit: some files added, changed or deleted
      const changed: string[] = [];
      const edits = 1 + Math.floor(rnd() * 3);
      for (let e = 0; e < edits; e++) {
        const p = names[Math.floor(rnd() * names.length)]!;
        if (tree.has(p) && rnd() < 0.3) tree.delete(p);
        else tree.set(p, `blob${blobNo++}`);
        changed.push(p);
      }
      // what the adapter locates: mostly the last list with a path added or dropped (same strings)
      const r = rnd();
      let kind: string;
      if (r < 0.5) {
        kind = 'carried';
        const p = names[Math.floor(rnd() * names.length)]!;
        located = located.includes(p) ? located.filter((x) => x !== p) : [...located, p].sort();
      } else if (r < 0.6) {
        kind = 'same text, new strings';
        located = located.map((p) => (' ' + p).slice(1));
      } else if (r < 0.7) {
        kind = 'shuffled';
        located = [...located].sort(() => rnd() - 0.5);
      } else if (r < 0.8) {
        kind = 'repeated';
        located = located.length > 0 ? [...located, located[0]!].sort() : located;
      } else if (r < 0.9) {
        kind = 'afresh';
        located = names.filter(() => rnd() < 0.5);
      } else {
        kind = 'empty or one';
        located = rnd() < 0.5 ? [] : [names[Math.floor(rnd() * names.length)]!];
      }
      kinds.add(kind);
      const lookups: string[] = [];
      const got = locatedRefs(located, last, changed, (p) => {
        lookups.push(p);
        const blob = tree.get(p);
        return blob ? keys.ref(p, blob) : undefined;
      });
      const want = plain(located, tree, keys);
      expect(got.paths, `step ${step} (${kind})`).toEqual(want.paths);
      // the very objects: a reference is one object per (path, blob) while the path keeps its blob
      expect(got.refs.length).toBe(want.refs.length);
      got.refs.forEach((ref, k) => expect(ref, `step ${step} (${kind}) ${want.paths[k]}`).toBe(want.refs[k]));
      got.files.forEach((ref, k) => expect(ref).toBe(want.files[k]));
      if (kind === 'carried') {
        // only the path that came and the changed ones are looked up
        const lastSet = new Set(last.paths);
        const expected = new Set([...located.filter((p) => !lastSet.has(p)), ...changed.filter((p) => located.includes(p))]);
        expect(new Set(lookups), `step ${step}`).toEqual(expected);
      }
      last = got;
    }
    expect(kinds.size).toBe(6);
  });

  it('is handed an unsorted list with repeats the first time', () => {
    const keys = new SetKeys();
    const tree = new Map([['b.js', '1'], ['a.js', '2']]);
    const got = locatedRefs(['b.js', 'a.js', 'b.js', 'gone.js'], NO_LOCATED, [], (p) => (tree.has(p) ? keys.ref(p, tree.get(p)!) : undefined));
    expect(got.paths).toEqual(['a.js', 'b.js', 'gone.js']);
    expect(got.refs.map((r) => r?.blob)).toEqual(['2', '1', undefined]);
    expect(got.files.map((r) => r.path)).toEqual(['a.js', 'b.js']);
  });
});
