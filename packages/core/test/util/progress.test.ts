import { describe, expect, it } from 'vitest';
import { streamProgress } from '../../src/util/progress.js';

function fakeStream(isTTY: boolean) {
  const writes: string[] = [];
  return { stream: { isTTY, columns: 100, write: (s: string) => (writes.push(s), true) } as unknown as NodeJS.WriteStream, writes };
}

describe('progress display', () => {
  it('on a terminal: a bar redrawn in place with done/total, rate and time left', () => {
    let t = 0;
    const { stream, writes } = fakeStream(true);
    const p = streamProgress(stream, () => t);
    p.phase('rebuilding versions', 200);
    t = 10_000;
    p.tick(100);
    p.done();
    const bar = writes.find((w) => w.includes('100/200'))!;
    expect(bar.startsWith('\r')).toBe(true);
    expect(bar).toContain('10.0/s');
    expect(bar).toContain('10s left');
    expect(writes[writes.length - 1]).toBe('\n');
  });

  it('not on a terminal: nothing for a short phase, plain lines for a long one', () => {
    let t = 0;
    const { stream, writes } = fakeStream(false);
    const p = streamProgress(stream, () => t);
    p.phase('short', 10);
    t = 500;
    p.tick(10);
    expect(writes).toEqual([]);
    p.phase('long', 100);
    t = 3_500;
    p.tick(30);
    t = 4_000;
    p.tick(31); // too soon after the last line
    t = 9_000;
    p.tick(60);
    p.done();
    expect(writes).toEqual(['long: 30/100 (30%), 10.0/s, about 7s left\n', 'long: 60/100 (60%), 7.1/s, about 6s left\n']);
  });
});
