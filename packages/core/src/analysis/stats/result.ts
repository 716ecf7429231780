/** A test or measure that could not be computed, with the reason in plain words (never NaN). */
export interface NotComputable {
  computable: false;
  reason: string;
}

/** A test whose statistic is referred to the chi-square distribution. */
export interface ChiSquareReferred {
  computable: true;
  statistic: number;
  /** Degrees of freedom. */
  df: number;
  /** Upper-tail p-value. */
  pValue: number;
}

export const notComputable = (reason: string): NotComputable => ({ computable: false, reason });

/** Neumaier's compensated sum: the sum of many terms of different sizes, without losing the small ones. */
export function accurateSum(values: Iterable<number>): number {
  let sum = 0;
  let comp = 0;
  for (const x of values) {
    const t = sum + x;
    comp += Math.abs(sum) >= Math.abs(x) ? sum - t + x : x - t + sum;
    sum = t;
  }
  return sum + comp;
}

/** A running compensated sum. */
export class Accumulator {
  private sum = 0;
  private comp = 0;
  add(x: number): void {
    const t = this.sum + x;
    this.comp += Math.abs(this.sum) >= Math.abs(x) ? this.sum - t + x : x - t + this.sum;
    this.sum = t;
  }
  get value(): number {
    return this.sum + this.comp;
  }
}
