import type { Analysis, TableMeasures } from '../../analysis/types.js';
import type { InterchangeDocument } from '../../interchange/document.js';
import { EDGE_ATTRIBUTES, graphRecords, NODE_ATTRIBUTES, type GraphAttribute } from '../graph/records.js';
import { xmlDocument, xmlValue } from '../graph/xml.js';

/** What the spells of a GEXF file count in: version indexes, or committer dates. */
export type GexfTime = 'version' | 'date';
export const GEXF_TIMES: readonly GexfTime[] = ['version', 'date'];

/** A spell: [first, last] versions (both included), or a version range whose end is open (the removal). */
interface Spell {
  from: number;
  /** Last version included; null while it lives at the last version. */
  to: number | null;
}

/** A committer date in UTC, to the second (xsd:dateTime). */
const utc = (iso: string): string => new Date(Date.parse(iso)).toISOString().replace(/\.\d{3}Z$/, 'Z');

/**
 * The GEXF 1.3 file of the history graph, a dynamic graph that graph tools can replay: every node
 * (table) and edge (foreign key) carries the spells in which it existed, and the dynamic attribute
 * `version_class` gives a table's topology class over its life; the measures are static
 * attributes. With `time: 'version'` spells count version indexes (`timeformat="integer"`, both
 * ends included); with `time: 'date'` they count committer dates in UTC (`timeformat="dateTime"`):
 * a spell starts at the date of the version that added the table and ends, open, at the date of
 * the version that removed it, or closed at the last version's date while it lives.
 */
export function gexfFile(doc: InterchangeDocument, analysis: Analysis, time: GexfTime = 'version'): string {
  const { nodes, edges, lastVersion } = graphRecords(analysis);
  const dates = analysis.versions.map((v) => utc(v.date));
  const spellAttrs = (s: Spell): Record<string, string | number> => {
    if (time === 'version') return { '@_start': s.from, '@_end': s.to ?? lastVersion };
    const start = dates[s.from]!;
    if (s.to === null || s.to >= lastVersion) return { '@_start': start, '@_end': dates[lastVersion]! };
    const end = dates[s.to + 1]!;
    // committer dates can go backwards; a spell never ends before it starts
    return { '@_start': start, '@_endopen': end < start ? start : end };
  };
  const attrDefs = (list: readonly GraphAttribute<never>[]) => list.map((a) => ({ '@_id': a.name, '@_title': a.name, '@_type': a.type }));
  const values = <T>(list: readonly GraphAttribute<T>[], t: T) =>
    list.flatMap((a) => {
      const v = a.value(t);
      return v === undefined || v === null ? [] : [{ '@_for': a.name, '@_value': xmlValue(v) }];
    });
  const classValues = (t: TableMeasures) =>
    (t.graph?.classes ?? []).map((r) => ({ '@_for': 'version_class', '@_value': r.class, ...spellAttrs({ from: r.from, to: r.to >= lastVersion ? null : r.to }) }));

  const nodeElements = nodes.map((t) => ({
    '@_id': t.id,
    '@_label': t.namespace ? `${t.namespace}.${t.name}` : t.name,
    attvalues: { attvalue: [...values(NODE_ATTRIBUTES, t), ...classValues(t)] },
    spells: { spell: t.spells.map((s) => spellAttrs({ from: s.born, to: s.removed === null ? null : s.removed - 1 })) },
  }));
  const edgeElements = edges.map((e) => ({
    '@_id': e.key,
    '@_source': e.source,
    '@_target': e.target,
    attvalues: { attvalue: values(EDGE_ATTRIBUTES, e) },
    spells: { spell: e.versions.map(([from, to]) => spellAttrs({ from, to: to >= lastVersion ? null : to })) },
  }));
  return xmlDocument({
    gexf: {
      '@_xmlns': 'http://gexf.net/1.3',
      '@_version': '1.3',
      meta: {
        creator: `${doc.generator.name} ${doc.generator.version}`,
        description: `History graph of ${doc.source.repository} at ${doc.source.ref} (${doc.source.head}): tables and foreign keys over ${analysis.versions.length} versions`,
      },
      graph: {
        '@_mode': 'dynamic',
        '@_defaultedgetype': 'directed',
        '@_timeformat': time === 'version' ? 'integer' : 'dateTime',
        '@_timerepresentation': 'interval',
        attributes: [
          // the dynamic block first: readers that keep one block per class (graphology-gexf keeps the last) then see the static measures
          { '@_class': 'node', '@_mode': 'dynamic', attribute: [{ '@_id': 'version_class', '@_title': 'version_class', '@_type': 'string' }] },
          { '@_class': 'node', '@_mode': 'static', attribute: attrDefs(NODE_ATTRIBUTES as readonly GraphAttribute<never>[]) },
          { '@_class': 'edge', '@_mode': 'static', attribute: attrDefs(EDGE_ATTRIBUTES as readonly GraphAttribute<never>[]) },
        ],
        nodes: { node: nodeElements },
        edges: { edge: edgeElements },
      },
    },
  });
}
