import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);
type Mt19937 = typeof import('@stdlib/random-base-mt19937');

/** A seeded source of uniform numbers (32-bit Mersenne Twister, as R and numpy's legacy generator use). */
export class SeededRandom {
  private readonly next: () => number;
  constructor(readonly seed: number) {
    // loaded on first use, not when the CLI starts
    this.next = (require('@stdlib/random-base-mt19937') as Mt19937).factory({ seed });
  }

  /** A uniform number in [0, 1) with 53 random bits (two draws, as genrand_res53 of the reference implementation). */
  uniform(): number {
    const a = this.next() >>> 5;
    const b = this.next() >>> 6;
    return (a * 67108864 + b) / 9007199254740992;
  }
}
