import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);
type Mt19937 = typeof import('@stdlib/random-base-mt19937');

/** A seeded source of uniform integers (32-bit Mersenne Twister, as R and numpy's legacy generator use). */
export class SeededRandom {
  private readonly next: () => number;
  constructor(readonly seed: number) {
    // loaded on first use, not when the CLI starts
    this.next = (require('@stdlib/random-base-mt19937') as Mt19937).factory({ seed });
  }

  /** A uniform integer in [0, n), without modulo bias (draws above the last whole multiple of n are redrawn). */
  below(n: number): number {
    const limit = Math.floor(4294967296 / n) * n;
    let x = this.next();
    while (x >= limit) x = this.next();
    return x % n;
  }

  /** A uniform number in [0, 1) with 53 random bits (two draws, as genrand_res53 of the reference implementation). */
  uniform(): number {
    const a = this.next() >>> 5;
    const b = this.next() >>> 6;
    return (a * 67108864 + b) / 9007199254740992;
  }

  /** Shuffle an array in place (Fisher-Yates). */
  shuffle<T>(a: T[] | Int32Array): void {
    for (let i = a.length - 1; i > 0; i--) {
      const j = this.below(i + 1);
      const t = a[i]!;
      a[i] = a[j]!;
      a[j] = t;
    }
  }
}
