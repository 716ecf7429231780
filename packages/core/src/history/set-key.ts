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

  /** The last list keyed, and the XOR of its members' digests. */
  private last: { files: readonly FileRef[]; acc: Uint32Array } | null = null;

  /**
   * Key of a set of file references, plus optional extra members given as text. The key is
   * worked out from the last list keyed: a walk over both lists side by side looks only at the
   * members that are not the same object at the same point, so consecutive versions (lists
   * sorted by path that share most members) cost what changed between them.
   */
  key(files: readonly FileRef[], extra: readonly string[] = []): string {
    const acc = this.membersDigest(files);
    for (const e of extra) {
      const d = words(`\u0003${e}`);
      for (let i = 0; i < 8; i++) acc[i]! ^= d[i]!;
    }
    return Buffer.from(acc.buffer).toString('hex');
  }

  /**
   * XOR of the digests of `files`, from the last list's: every member of either list that the
   * walk does not pair with the same object in the other is XORed in once. A pair cancels out
   * of both, so the result is right whatever the order; sorted lists pair up the most.
   */
  private membersDigest(files: readonly FileRef[]): Uint32Array {
    const acc = this.last ? this.last.acc.slice() : new Uint32Array(8);
    const xor = (f: FileRef): void => {
      const d = this.digest(f);
      for (let i = 0; i < 8; i++) acc[i]! ^= d[i]!;
    };
    walkUnpaired(this.last?.files ?? [], files, xor, xor);
    this.last = { files, acc: acc.slice() };
    return acc;
  }
}

/**
 * A walk over two lists side by side, in the order of their paths: a member that is the same
 * object at the same point of both is paired; `prevOnly` and `nextOnly` get every other member,
 * once. For lists sorted by path, the unpaired ones are those that differ between them.
 */
function walkUnpaired(prev: readonly FileRef[], next: readonly FileRef[], prevOnly: (f: FileRef) => void, nextOnly: (f: FileRef) => void): void {
  let i = 0;
  let j = 0;
  while (i < prev.length || j < next.length) {
    const x = prev[i];
    const y = next[j];
    if (x === y) {
      i++;
      j++;
    } else if (y === undefined || (x !== undefined && x.path <= y.path)) {
      prevOnly(x!);
      i++;
      if (y !== undefined && x!.path === y.path) {
        nextOnly(y);
        j++;
      }
    } else {
      nextOnly(y);
      j++;
    }
  }
}

/** What changed from one sorted list of file references to the next: paths removed or given another blob, and the members new in `next`. */
export function refChanges(prev: readonly FileRef[], next: readonly FileRef[]): { removed: string[]; added: FileRef[] } {
  const removed: string[] = [];
  const added: FileRef[] = [];
  walkUnpaired(prev, next, (f) => removed.push(f.path), (f) => added.push(f));
  return { removed, added };
}

/**
 * The members of `next` that a walk over both lists side by side (as in `SetKeys.key`) does not
 * pair with the same object in `prev`: for lists sorted by path, the members new in `next`.
 */
export function unpaired(prev: readonly FileRef[], next: readonly FileRef[]): FileRef[] {
  const out: FileRef[] = [];
  walkUnpaired(prev, next, () => undefined, (f) => out.push(f));
  return out;
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
