/** Helpers for sorted lists of strings (paths), shared by core and the adapters. */

/** Sorted, without duplicates; the input is returned as is when it already is. */
export function sortedUnique(xs: readonly string[]): string[] {
  let ok = true;
  for (let i = 1; i < xs.length; i++) {
    if (!(xs[i - 1]! < xs[i]!)) {
      ok = false;
      break;
    }
  }
  if (ok) return xs as string[];
  // a sort that is quick on nearly sorted input, then equal neighbours dropped
  const sorted = xs.slice().sort();
  let n = 0;
  for (let i = 0; i < sorted.length; i++) if (i === 0 || sorted[i] !== sorted[n - 1]) sorted[n++] = sorted[i]!;
  sorted.length = n;
  return sorted;
}

/** The first position in `sorted` whose value is not less than `value` (where it is, or would go). */
export function sortedIndex(sorted: readonly string[], value: string): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid]! < value) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
