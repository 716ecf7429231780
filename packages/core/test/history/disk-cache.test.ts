import { appendFileSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { RecordPack } from '../../src/history/disk-cache.js';

const dir = mkdtempSync(join(tmpdir(), 'strata-pack-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

type Rec = { k: 'a'; n: number } | { k: 'o'; key: string; v: number[] };

describe('RecordPack', () => {
  it('reads back what was flushed, skipping torn lines, and parses deferred records only on request', () => {
    const first = new RecordPack<Rec>(dir, 'ns');
    expect(first.loaded).toEqual([]);
    first.add({ k: 'a', n: 1 });
    first.add({ k: 'o', key: 'k1', v: [1, 2] });
    first.add({ k: 'o', key: 'k2', v: [3] });
    first.flush();
    // a crash in the middle of a write leaves a torn line; the next flush starts on a new line
    appendFileSync(first.path, '{"k":"a","n":');
    const second = new RecordPack<Rec>(dir, 'ns');
    second.add({ k: 'a', n: 2 });
    second.flush();

    const plain = new RecordPack<Rec>(dir, 'ns');
    expect(plain.loaded).toEqual([{ k: 'a', n: 1 }, { k: 'o', key: 'k1', v: [1, 2] }, { k: 'o', key: 'k2', v: [3] }, { k: 'a', n: 2 }]);

    const lazy = new RecordPack<Rec>(dir, 'ns', ['o']);
    expect(lazy.loaded).toEqual([{ k: 'a', n: 1 }, { k: 'a', n: 2 }]);
    expect(lazy.deferredRecord('k2')).toEqual({ k: 'o', key: 'k2', v: [3] });
    expect(lazy.deferredRecord('k1')).toEqual({ k: 'o', key: 'k1', v: [1, 2] });
    expect(lazy.deferredRecord('k3')).toBeUndefined();
  });

  it('a torn deferred record is absent, not an error', () => {
    const pack = new RecordPack<Rec>(dir, 'torn');
    appendFileSync(pack.path, '{"k":"o","key":"k9","v":[1,\n');
    expect(new RecordPack<Rec>(dir, 'torn', ['o']).deferredRecord('k9')).toBeUndefined();
  });
});
