import { createHash } from 'node:crypto';
import type { FileRef } from './engine.js';

/**
 * Keys of sets of (path, blob) pairs, cheap to compute again and again: each pair's digest is
 * computed once (by the pair's interned object) and a set's key is the XOR of its members'
 * digests, so equal sets get equal keys whatever their order, in time linear in the set with
 * no string building. Paths are unique within a set, so no member appears twice.
 */
export class SetKeys {
  private readonly digests = new WeakMap<object, Buffer>();
  private readonly refs = new Map<string, FileRef>();

  /** The one FileRef object of a (path, blob) pair while its path keeps that blob. */
  ref(path: string, blob: string): FileRef {
    let r = this.refs.get(path);
    if (!r || r.blob !== blob) {
      r = { path, blob };
      this.refs.set(path, r);
    }
    return r;
  }

  private digest(r: FileRef): Buffer {
    let d = this.digests.get(r);
    if (!d) {
      d = createHash('sha256').update(`${r.path}\u0000${r.blob}`).digest();
      this.digests.set(r, d);
    }
    return d;
  }

  /** Key of a set of file references, plus optional extra members given as text. */
  key(files: readonly FileRef[], extra: readonly string[] = []): string {
    const acc = Buffer.alloc(32);
    for (const f of files) xorInto(acc, this.digest(f));
    for (const e of extra) xorInto(acc, createHash('sha256').update(`\u0003${e}`).digest());
    return acc.toString('hex');
  }
}

function xorInto(acc: Buffer, d: Buffer): void {
  for (let i = 0; i < 32; i += 4) acc.writeInt32LE(acc.readInt32LE(i) ^ d.readInt32LE(i), i);
}

/** Whether two lists hold the same objects in the same order. */
export function sameRefs(a: readonly unknown[], b: readonly unknown[]): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/** Sorted, without duplicates; the input is returned as is when it already is. */
export function sortedUnique(xs: readonly string[]): string[] {
  let ok = true;
  for (let i = 1; i < xs.length; i++) {
    if (!(xs[i - 1]! < xs[i]!)) {
      ok = false;
      break;
    }
  }
  return ok ? (xs as string[]) : [...new Set(xs)].sort();
}
