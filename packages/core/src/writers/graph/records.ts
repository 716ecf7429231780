import type { Analysis, HistoryEdge, TableMeasures } from '../../analysis/types.js';
import type { VersionRange } from '../../analysis/ranges.js';

/** A value type of a graph attribute, named as GEXF names it (GraphML: `int` for `integer`). */
export type GraphAttributeType = 'string' | 'integer' | 'double' | 'boolean';

/** One attribute of the nodes or edges of the graph exports (GEXF, GraphML, DOT). */
export interface GraphAttribute<T> {
  name: string;
  type: GraphAttributeType;
  description: string;
  /** Undefined or null: the attribute is left out for this node or edge. */
  value: (t: T) => string | number | boolean | null | undefined;
}

/** An edge of the exports: one foreign key of the history graph, with whether it exists at the last version. */
export interface ExportEdge extends HistoryEdge {
  alive: boolean;
}

const ranges = (r: readonly VersionRange[]): string => r.map(([a, b]) => (a === b ? `${a}` : `${a}-${b}`)).join(';');

/** Attributes of every node (a table in the measures). */
export const NODE_ATTRIBUTES: readonly GraphAttribute<TableMeasures>[] = [
  { name: 'table_name', type: 'string', description: 'Physical name at the last version that had the table (the node id is its stable id; the label adds the namespace).', value: (t) => t.name },
  { name: 'namespace', type: 'string', description: 'Database schema (namespace); absent for the default one.', value: (t) => t.namespace },
  { name: 'orm_name', type: 'string', description: 'Name of the model, entity or class in the ORM code.', value: (t) => t.ormName },
  { name: 'kind', type: 'string', description: '`table`, or `implicit-join` for a join table an ORM creates implicitly.', value: (t) => t.kind },
  { name: 'in_degree', type: 'integer', description: 'Distinct other tables that ever referenced the table (history graph).', value: (t) => t.graph?.inDegree },
  { name: 'out_degree', type: 'integer', description: 'Distinct other tables the table ever referenced.', value: (t) => t.graph?.outDegree },
  { name: 'degree', type: 'integer', description: 'in_degree + out_degree: distinct neighbours.', value: (t) => t.graph?.degree },
  { name: 'self_references', type: 'integer', description: 'Foreign keys of the table to itself (not counted in the degrees).', value: (t) => t.graph?.selfReferences },
  { name: 'topology_class', type: 'string', description: 'Class in the history graph: `isolated`, `source`, `sink` or `intermediate`.', value: (t) => t.graph?.class },
  { name: 'class_changes', type: 'integer', description: 'Changes of class between consecutive versions of its life.', value: (t) => t.graph?.classChanges },
  { name: 'birth_group', type: 'string', description: '`initial` or `later`.', value: (t) => t.birthGroup },
  { name: 'birth_version', type: 'integer', description: 'Index of the version the table first appeared in.', value: (t) => t.birth.version },
  { name: 'birth_date', type: 'string', description: 'Committer date of that version, ISO 8601.', value: (t) => t.birth.date },
  { name: 'removal_version', type: 'integer', description: 'Index of the version at which the table was last removed; absent while it lives.', value: (t) => t.removal?.version },
  { name: 'removal_date', type: 'string', description: 'Committer date of that version, ISO 8601.', value: (t) => t.removal?.date },
  { name: 'alive', type: 'boolean', description: 'Whether the table exists at the last version.', value: (t) => t.removal === null },
  { name: 'spells', type: 'string', description: 'Versions the table existed in, as `first-last` ranges (both included; last empty while it lives), separated by `;`.', value: (t) => t.spells.map((s) => `${s.born}-${s.removed === null ? '' : s.removed - 1}`).join(';') },
  { name: 'lifetime_versions', type: 'integer', description: 'Versions the table lived in (summed over its spells).', value: (t) => t.lifetime.versions },
  { name: 'lifetime_days', type: 'double', description: 'Days of life by committer date (summed over its spells).', value: (t) => t.lifetime.days },
  { name: 'columns_at_birth', type: 'integer', description: 'Columns at its first birth.', value: (t) => t.columns.atBirth },
  { name: 'columns_at_end', type: 'integer', description: 'Columns at the last version that had it.', value: (t) => t.columns.atEnd },
  { name: 'counted_updates', type: 'integer', description: 'Changes of the counted kinds (see the analysis options).', value: (t) => t.countedUpdates },
  { name: 'updates_per_version', type: 'double', description: 'Counted updates per version of life.', value: (t) => t.updatesPerVersion },
  { name: 'updates_per_year', type: 'double', description: 'Counted updates per year (365.25 days) of life; absent below 30 days of life.', value: (t) => t.updatesPerYear },
  { name: 'activity_band', type: 'string', description: '`unchanged`, `low` or `high`; absent when its rate cannot be computed.', value: (t) => t.activityBand },
];

/** Attributes of every edge (a foreign key of the history graph). */
export const EDGE_ATTRIBUTES: readonly GraphAttribute<ExportEdge>[] = [
  { name: 'columns', type: 'string', description: 'Referencing columns, separated by `,` (the edge id is the foreign key identity: table, columns and target).', value: (e) => e.columns.join(',') },
  { name: 'referenced_columns', type: 'string', description: 'Referenced columns, separated by `,`.', value: (e) => e.referencedColumns.join(',') },
  { name: 'enforcement', type: 'string', description: 'Enforcements it had: `database`, `orm`, or both separated by `,`.', value: (e) => e.enforcement.join(',') },
  { name: 'versions', type: 'string', description: 'Versions the foreign key existed in, as `first-last` ranges (both included), separated by `;`.', value: (e) => ranges(e.versions) },
  { name: 'self_reference', type: 'boolean', description: 'Whether the foreign key references its own table.', value: (e) => e.source === e.target },
  { name: 'alive', type: 'boolean', description: 'Whether the foreign key exists at the last version.', value: (e) => e.alive },
];

/** The nodes and edges of the graph exports: the history graph of the analysis, in its order. */
export function graphRecords(analysis: Analysis): { nodes: TableMeasures[]; edges: ExportEdge[]; lastVersion: number } {
  const lastVersion = analysis.versions[analysis.versions.length - 1]!.index;
  const nodes = analysis.tables.filter((t) => t.graph !== null);
  const edges = analysis.graph.edges.map((e) => ({ ...e, alive: e.versions.some(([, to]) => to === lastVersion) }));
  return { nodes, edges, lastVersion };
}

/** The attributes for the codebook (packages/core/schema/graph-fields.json). */
export function graphFieldsDocument(): {
  description: string;
  node: Array<{ name: string; type: string; description: string }>;
  edge: Array<{ name: string; type: string; description: string }>;
} {
  const strip = (a: readonly GraphAttribute<never>[]) => a.map(({ name, type, description }) => ({ name, type, description }));
  return {
    description:
      'Written by `schema-strata export history.json --format gexf|graphml|dot -o FILE`: the history graph, one node per table in the measures (id: its stable id, label: its name), one directed edge per foreign key from the referencing table to the referenced one (id: the foreign key identity). GEXF is a dynamic graph: nodes and edges carry their lifetimes as spells (`--time version`: version indexes, both ends included; `--time date`: committer dates, a removal as an open end), and a dynamic attribute `version_class` gives the topology class in every version. GraphML and DOT carry the same attributes, the lifetimes as `spells` and `versions` text.',
    node: strip(NODE_ATTRIBUTES as readonly GraphAttribute<never>[]),
    edge: strip(EDGE_ATTRIBUTES as readonly GraphAttribute<never>[]),
  };
}
