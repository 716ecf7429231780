import { digraph, toDot, type EdgeAttributesObject, type NodeAttributesObject } from 'ts-graphviz';
import type { Analysis } from '../../analysis/types.js';
import type { InterchangeDocument } from '../../interchange/document.js';
import { CLASS_COLOURS } from '../../report/palette.js';
import { EDGE_ATTRIBUTES, graphRecords, NODE_ATTRIBUTES, type GraphAttribute } from '../graph/records.js';

/** Backslashes doubled, so that Graphviz's label escapes (`\n`, `\l`...) never fire on a name. */
const escLabel = (s: string): string => s.replace(/\\/g, '\\\\');

const LIGHT_TEXT = new Set(['sink', 'intermediate']);

/**
 * The DOT file of the history graph (written with ts-graphviz): one node per table in the
 * measures, filled with its topology class's colour from the report's palette, one edge per
 * foreign key from the referencing table to the referenced one; tables and foreign keys removed
 * before the last version are dashed. Every measure is also an attribute of its node or edge
 * (Graphviz ignores attributes it does not know and keeps them in `-Tjson` and `-Tdot` output).
 */
export function dotFile(doc: InterchangeDocument, analysis: Analysis): string {
  const { nodes, edges } = graphRecords(analysis);
  const g = digraph('history', {
    label: escLabel(`History graph of ${doc.source.repository} (${analysis.versions.length} versions)`),
    labelloc: 't',
    rankdir: 'LR',
    fontname: 'Helvetica',
    comment: `written by ${doc.generator.name} ${doc.generator.version}`,
  });
  g.attributes.node.apply({ shape: 'box', style: 'filled,rounded', fontname: 'Helvetica', fontsize: 11, penwidth: 0.8 });
  g.attributes.edge.apply({ color: '#7d7a70', arrowsize: 0.7 });
  const attrs = <T>(list: readonly GraphAttribute<T>[], t: T): Record<string, string> => {
    const out: Record<string, string> = {};
    for (const a of list) {
      const v = a.value(t);
      if (v !== undefined && v !== null) out[a.name] = typeof v === 'string' ? escLabel(v) : String(v);
    }
    return out;
  };
  for (const t of nodes) {
    const cls = t.graph!.class;
    const alive = t.removal === null;
    g.node(t.id, {
      ...attrs(NODE_ATTRIBUTES, t),
      label: escLabel(t.namespace ? `${t.namespace}.${t.name}` : t.name),
      fillcolor: alive ? CLASS_COLOURS[cls] : `${CLASS_COLOURS[cls]}66`,
      fontcolor: LIGHT_TEXT.has(cls) && alive ? '#ffffff' : '#22262b',
      style: alive ? 'filled,rounded' : 'filled,rounded,dashed',
    } as unknown as NodeAttributesObject);
  }
  for (const e of edges) {
    g.edge([e.source, e.target], {
      ...attrs(EDGE_ATTRIBUTES, e),
      id: escLabel(e.key),
      ...(e.alive ? {} : { style: 'dashed' }),
    } as unknown as EdgeAttributesObject);
  }
  return toDot(g) + '\n';
}
