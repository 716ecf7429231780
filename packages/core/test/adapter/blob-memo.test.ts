import { describe, expect, it } from 'vitest';
import { BlobMemo } from '../../src/adapter/blob-memo.js';
import type { TreeView } from '../../src/adapter/api.js';

/** A tree of paths to (blob id, text); counts its reads. */
function tree(files: Record<string, [string, string | undefined]>): TreeView & { reads: number } {
  const t = {
    commit: 'c',
    reads: 0,
    paths: () => Object.keys(files),
    has: (p: string) => p in files,
    blob: (p: string) => files[p]?.[0],
    read: async (p: string) => {
      t.reads++;
      return files[p]?.[1];
    },
    under: () => [],
  };
  return t;
}

describe('BlobMemo: a value derived once per blob', () => {
  it('derives a blob once, whatever path or tree it is met under, and gives undefined for a path without a blob', async () => {
    const memo = new BlobMemo<number>();
    const seen: string[] = [];
    const length = (text: string | undefined, blob: string): number => {
      seen.push(blob);
      return text?.length ?? -1;
    };
    const a = tree({ 'x.ts': ['b1', 'abc'], 'bin.dat': ['b2', undefined] });
    const b = tree({ 'moved/x.ts': ['b1', 'abc'], 'y.ts': ['b3', 'hello'] });
    expect(await memo.of(a, 'x.ts', length)).toBe(3);
    expect(await memo.of(b, 'moved/x.ts', length)).toBe(3);
    expect(await memo.of(b, 'y.ts', length)).toBe(5);
    // an unreadable (binary) file is derived from undefined, once
    expect(await memo.of(a, 'bin.dat', length)).toBe(-1);
    expect(await memo.of(a, 'bin.dat', length)).toBe(-1);
    expect(await memo.of(a, 'absent.ts', length)).toBeUndefined();
    expect(seen).toEqual(['b1', 'b3', 'b2']);
    expect(a.reads + b.reads).toBe(3);
  });

  it('keeps a falsy value (null, false) as a value', async () => {
    const memo = new BlobMemo<boolean | null>();
    let calls = 0;
    const t = tree({ 'k.js': ['b9', 'module.exports = {}'] });
    const never = (): null => {
      calls++;
      return null;
    };
    expect(await memo.of(t, 'k.js', never)).toBeNull();
    expect(await memo.of(t, 'k.js', never)).toBeNull();
    expect(calls).toBe(1);
  });
});
