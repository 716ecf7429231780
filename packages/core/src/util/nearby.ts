/**
 * A walk through the last version's list (of files, of tables) while the next version's list is
 * built from it: consecutive versions share most items at nearby places, so an item is looked
 * for at the walk's point and one further on (past an item that changed or went) by comparing
 * objects, where a map lookup would cost a hash.
 */
export interface NearbyWalk {
  /** The walk's point in the last list. */
  j: number;
}

/** Where `x` stands in `last` at the walk's point or one past it (and the walk moves past it), else -1. */
export function findNearby<T>(last: readonly T[], at: NearbyWalk, x: T): number {
  const j = at.j;
  if (last[j] === x) {
    at.j = j + 1;
    return j;
  }
  if (last[j + 1] === x) {
    at.j = j + 2;
    return j + 1;
  }
  return -1;
}
