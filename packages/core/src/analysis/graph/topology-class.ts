/** Topology class of a table in a foreign-key graph. */
export type TopologyClass = 'isolated' | 'source' | 'sink' | 'intermediate';
export const TOPOLOGY_CLASSES: readonly TopologyClass[] = ['isolated', 'source', 'sink', 'intermediate'];

/**
 * `isolated` (in 0, out 0), `source` (out > 0, in 0), `sink` (in > 0, out 0), `intermediate`
 * (in > 0 and out > 0); degrees count distinct other tables.
 */
export function topologyClassOf(inDegree: number, outDegree: number): TopologyClass {
  if (inDegree === 0) return outDegree === 0 ? 'isolated' : 'source';
  return outDegree === 0 ? 'sink' : 'intermediate';
}
