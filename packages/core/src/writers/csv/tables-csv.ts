import { CHANGE_KINDS } from '../../changes/kinds.js';
import type { Analysis, TableMeasures } from '../../analysis/types.js';
import { csvText, under, type CsvColumn } from './csv-text.js';

/** Columns of tables.csv: one row per table that ever existed, with every measure. */
export const TABLE_COLUMNS: readonly CsvColumn<TableMeasures>[] = [
  { name: 'id', type: 'string', description: 'Stable id of the table (its first physical name, qualified by its namespace).', value: (t) => t.id },
  { name: 'name', type: 'string', description: 'Physical name at the last version that had the table.', value: (t) => t.name },
  { name: 'namespace', type: 'string', description: 'Database schema (namespace); empty for the default one.', value: (t) => t.namespace },
  { name: 'orm_name', type: 'string', description: 'Name of the model, entity or class in the ORM code.', value: (t) => t.ormName },
  { name: 'kind', type: 'string', description: '`table`, or `implicit-join` for a join table an ORM creates implicitly.', value: (t) => t.kind },
  { name: 'former_names', type: 'string', description: 'Other physical names the table had, separated by `;`.', value: (t) => t.formerNames?.join(';') },
  { name: 'included', type: 'boolean', description: 'Whether the table is in the measures and statistics (false when a filter left it out).', value: (t) => t.included },
  { name: 'excluded_because', type: 'string', description: 'Which filter left the table out.', value: (t) => t.excludedBecause },
  { name: 'birth_version', type: 'integer', description: 'Index of the version the table first appeared in.', value: (t) => t.birth.version },
  { name: 'birth_commit', type: 'string', description: 'Commit of that version.', value: (t) => t.birth.commit },
  { name: 'birth_date', type: 'date-time', description: 'Committer date of that version, ISO 8601.', value: (t) => t.birth.date },
  { name: 'removal_version', type: 'integer', description: 'Index of the version at which the table was last removed; empty while it lives.', value: (t) => t.removal?.version },
  { name: 'removal_commit', type: 'string', description: 'Commit of that version.', value: (t) => t.removal?.commit },
  { name: 'removal_date', type: 'date-time', description: 'Committer date of that version, ISO 8601.', value: (t) => t.removal?.date },
  { name: 'spells', type: 'string', description: 'Spells of life as `born-removed` (removed empty while it lives), separated by `;`.', value: (t) => t.spells.map((s) => `${s.born}-${s.removed ?? ''}`).join(';') },
  { name: 'birth_group', type: 'string', description: '`initial` or `later`.', value: (t) => t.birthGroup },
  { name: 'lifetime_versions', type: 'integer', description: 'Versions the table lived in (summed over its spells).', value: (t) => t.lifetime.versions },
  { name: 'lifetime_days', type: 'number', description: 'Days of life by committer date (summed over its spells).', value: (t) => t.lifetime.days },
  { name: 'columns_at_birth', type: 'integer', description: 'Columns at its first birth.', value: (t) => t.columns.atBirth },
  { name: 'columns_at_end', type: 'integer', description: 'Columns at the last version that had it.', value: (t) => t.columns.atEnd },
  ...CHANGE_KINDS.map((k): CsvColumn<TableMeasures> => ({ name: `changes_${under(k)}`, type: 'integer', description: `Changes of kind \`${k}\` to the table.`, value: (t) => t.changes[k] })),
  { name: 'counted_updates', type: 'integer', description: 'Changes of the counted kinds (see the analysis options).', value: (t) => t.countedUpdates },
  { name: 'updates_per_version', type: 'number', description: 'Counted updates per version of life.', value: (t) => t.updatesPerVersion },
  { name: 'updates_per_year', type: 'number', description: 'Counted updates per year (365.25 days) of life; empty below 30 days of life.', value: (t) => t.updatesPerYear },
  { name: 'activity_band', type: 'string', description: '`unchanged`, `low` or `high`; empty when its rate cannot be computed.', value: (t) => t.activityBand },
  { name: 'in_degree', type: 'integer', description: 'Distinct other tables that ever referenced the table (history graph); empty when left out.', value: (t) => t.graph?.inDegree },
  { name: 'out_degree', type: 'integer', description: 'Distinct other tables the table ever referenced (history graph).', value: (t) => t.graph?.outDegree },
  { name: 'degree', type: 'integer', description: 'in_degree + out_degree: distinct neighbours.', value: (t) => t.graph?.degree },
  { name: 'self_references', type: 'integer', description: 'Foreign keys of the table to itself (not counted in the degrees).', value: (t) => t.graph?.selfReferences },
  { name: 'references', type: 'string', description: 'Tables it referenced as `table:foreign keys`, separated by `;`.', value: (t) => t.graph?.references.map((r) => `${r.table}:${r.foreignKeys}`).join(';') },
  { name: 'referenced_by', type: 'string', description: 'Tables that referenced it as `table:foreign keys`, separated by `;`.', value: (t) => t.graph?.referencedBy.map((r) => `${r.table}:${r.foreignKeys}`).join(';') },
  { name: 'topology_class', type: 'string', description: 'Class in the history graph: `isolated`, `source`, `sink` or `intermediate`.', value: (t) => t.graph?.class },
  { name: 'class_changes', type: 'integer', description: 'Changes of class between consecutive versions of its life (per-version graphs).', value: (t) => t.graph?.classChanges },
  { name: 'classes', type: 'string', description: 'Class in every version of its life as `first-last:class`, separated by `;`.', value: (t) => t.graph?.classes.map((r) => `${r.from}-${r.to}:${r.class}`).join(';') },
];

export function tablesCsv(a: Analysis): string {
  return csvText(TABLE_COLUMNS, a.tables);
}
