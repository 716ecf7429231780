import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { childFlags, ProcessPool } from '../../src/study/pool.js';

const CHILD = fileURLToPath(new URL('./fixtures/echo-child.mjs', import.meta.url));
type Job = { action: 'ok' | 'fail' | 'die'; value: number; ms?: number };
type Result = { value: number; pid: number; flags: string[] };

describe('the process pool of a study', () => {
  it('runs every job once, at most `size` at once, in long-lived children', async () => {
    const pool = new ProcessPool<Job, Result>(2, CHILD);
    let peak = 0;
    const jobs = Array.from({ length: 8 }, (_, i) => ({ action: 'ok' as const, value: i, ms: 30 }));
    const results = await Promise.all(
      jobs.map((j) => {
        const p = pool.run(j);
        peak = Math.max(peak, pool.running);
        return p;
      }),
    );
    expect(results.map((r) => r.value)).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
    expect(peak).toBeLessThanOrEqual(2);
    expect(new Set(results.map((r) => r.pid)).size).toBe(2);
    await pool.close();
  });

  it('a child that dies or fails rejects its own job only; the next job gets a fresh child', async () => {
    const pool = new ProcessPool<Job, Result>(1, CHILD);
    const a = pool.run({ action: 'ok', value: 1 });
    const b = pool.run({ action: 'die', value: 2 });
    const c = pool.run({ action: 'fail', value: 3 });
    const d = pool.run({ action: 'ok', value: 4 });
    const ra = await a;
    await expect(b).rejects.toThrow('its worker process ended with code 7');
    await expect(c).rejects.toThrow('failed 3');
    const rd = await d;
    expect(rd.value).toBe(4);
    expect(rd.pid).not.toBe(ra.pid);
    await pool.close();
  });

  it('close waits for running jobs, rejects those not started, and leaves no child behind', async () => {
    const pool = new ProcessPool<Job, Result>(1, CHILD);
    const running = pool.run({ action: 'ok', value: 1, ms: 200 });
    const waiting = pool.run({ action: 'ok', value: 2 });
    await new Promise((r) => setTimeout(r, 50));
    const closing = pool.close();
    await expect(waiting).rejects.toThrow('closed before the job started');
    const r = await running;
    await closing;
    expect(r.value).toBe(1);
    expect(() => process.kill(r.pid, 0)).toThrow();
    await expect(pool.run({ action: 'ok', value: 3 })).rejects.toThrow('the pool is closed');
  });

  it('children of a pool as large as the machine run single-threaded; a smaller pool leaves them their threads', async () => {
    expect(childFlags(2, 2)).toEqual(['--single-threaded']);
    expect(childFlags(3, 2)).toEqual(['--single-threaded']);
    expect(childFlags(1, 2)).toEqual([]);
    expect(childFlags(1, 1)).toEqual(['--single-threaded']);
    // what the children were started with, as they see it themselves
    const big = new ProcessPool<Job, Result>(64, CHILD);
    const fromBig = await Promise.all([1, 2].map((value) => big.run({ action: 'ok', value })));
    await big.close();
    for (const r of fromBig) expect(r.flags).toEqual(['--single-threaded']);
    const one = new ProcessPool<Job, Result>(1, CHILD);
    const fromOne = await one.run({ action: 'ok', value: 3 });
    await one.close();
    expect(fromOne.flags).toEqual(childFlags(1));
  });
});
