/** A small, seedable PRNG (mulberry32): numbers in [0, 1), the same sequence for the same seed. */
export function rng(seed: number): () => number;
