import { describe, expect, it } from 'vitest';
import { sortedIndex, sortedUnique } from '../../src/util/sorted.js';

describe('sortedUnique', () => {
  it('sorts and drops duplicates, and hands back a list that already is', () => {
    const sorted = ['a', 'b', 'c'];
    expect(sortedUnique(sorted)).toBe(sorted);
    expect(sortedUnique(['k', 'a', 'k', 'b', 'a'])).toEqual(['a', 'b', 'k']);
    expect(sortedUnique([])).toEqual([]);
  });
});

describe('sortedIndex', () => {
  it('gives where a value is, or where it would go, in a sorted list', () => {
    const xs = ['b', 'd', 'd', 'f'];
    expect([sortedIndex(xs, 'a'), sortedIndex(xs, 'b'), sortedIndex(xs, 'c'), sortedIndex(xs, 'd'), sortedIndex(xs, 'e'), sortedIndex(xs, 'g')]).toEqual([0, 0, 1, 1, 3, 4]);
    expect(sortedIndex([], 'x')).toBe(0);
  });
});
