import { CHANGE_KINDS } from '../../changes/kinds.js';
import { TOPOLOGY_CLASSES } from '../../analysis/graph/topology-class.js';
import type { VersionPoint } from '../../analysis/series/version-series.js';
import type { Analysis } from '../../analysis/types.js';
import { csvText, under, type CsvColumn } from './csv-text.js';

/** Columns of versions.csv: one row per version, the growth curve. */
export const VERSION_COLUMNS: readonly CsvColumn<VersionPoint>[] = [
  { name: 'version', type: 'integer', description: 'Index of the version, from 0.', value: (v) => v.index },
  { name: 'commit', type: 'string', description: 'Commit id.', value: (v) => v.commit },
  { name: 'date', type: 'date-time', description: 'Committer date, ISO 8601.', value: (v) => v.date },
  { name: 'status', type: 'string', description: '`ok`, `no change`, `partial`, `carried` or `absent` (an absent version keeps the last schema).', value: (v) => v.status },
  { name: 'tables', type: 'integer', description: 'Tables in the measures at this version.', value: (v) => v.tables },
  { name: 'columns', type: 'integer', description: 'Columns of those tables.', value: (v) => v.columns },
  { name: 'foreign_keys', type: 'integer', description: 'Foreign keys of those tables (left out: ORM-only ones under --exclude-orm-fks, and those to excluded tables).', value: (v) => v.foreignKeys },
  { name: 'changes', type: 'integer', description: 'Changes seen at this version (tables in the measures).', value: (v) => CHANGE_KINDS.reduce((n, k) => n + v.changes[k], 0) },
  ...CHANGE_KINDS.map((k): CsvColumn<VersionPoint> => ({ name: `changes_${under(k)}`, type: 'integer', description: `Changes of kind \`${k}\` at this version.`, value: (v) => v.changes[k] })),
  { name: 'counted_updates', type: 'integer', description: 'Counted updates at this version.', value: (v) => v.countedUpdates },
  ...TOPOLOGY_CLASSES.map((c): CsvColumn<VersionPoint> => ({ name: c, type: 'integer', description: `Tables of class \`${c}\` in this version's foreign-key graph.`, value: (v) => v.classes[c] })),
];

export function versionsCsv(a: Analysis): string {
  return csvText(VERSION_COLUMNS, a.versions);
}
