/** A run of consecutive versions, both ends included: `[first, last]`. */
export type VersionRange = [number, number];

/** Collects the versions at which something exists, in increasing order, as ranges. */
export class RangeBuilder {
  readonly ranges: VersionRange[] = [];

  /** Record version `v` (called with increasing `v`; repeated calls for one version are fine). */
  mark(v: number): void {
    const last = this.ranges[this.ranges.length - 1];
    if (last && last[1] >= v) return;
    if (last && last[1] === v - 1) last[1] = v;
    else this.ranges.push([v, v]);
  }
}

/** Number of versions in a list of ranges. */
export function rangeLength(ranges: readonly VersionRange[]): number {
  return ranges.reduce((n, [a, b]) => n + b - a + 1, 0);
}
