import { createHash } from 'node:crypto';
import type { FileRef } from './engine.js';

/**
 * Keys of sets of (path, blob) pairs, cheap to compute again and again: each pair's digest is
 * computed once (by the pair's interned object) and a set's key is the XOR of its members'
 * digests, so equal sets get equal keys whatever their order, in time linear in the set with
 * no string building. Paths are unique within a set, so no member appears twice.
 */
export class SetKeys {
  private readonly digests = new WeakMap<object, Uint32Array>();
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

  private digest(r: FileRef): Uint32Array {
    let d = this.digests.get(r);
    if (!d) {
      d = words(`${r.path}\u0000${r.blob}`);
      this.digests.set(r, d);
    }
    return d;
  }

  /** Key of a set of file references, plus optional extra members given as text. */
  key(files: readonly FileRef[], extra: readonly string[] = []): string {
    const acc = new Uint32Array(8);
    for (const f of files) {
      const d = this.digest(f);
      for (let i = 0; i < 8; i++) acc[i]! ^= d[i]!;
    }
    for (const e of extra) {
      const d = words(`\u0003${e}`);
      for (let i = 0; i < 8; i++) acc[i]! ^= d[i]!;
    }
    return Buffer.from(acc.buffer).toString('hex');
  }
}

/** SHA-256 of a text as eight 32-bit words. */
function words(text: string): Uint32Array {
  const b = createHash('sha256').update(text).digest();
  return new Uint32Array(b.buffer.slice(b.byteOffset, b.byteOffset + 32));
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
