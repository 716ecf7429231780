import type { Change } from '../../changes/kinds.js';
import type { Analysis } from '../../analysis/types.js';
import type { InterchangeDocument } from '../../interchange/document.js';
import { csvText, under, type CsvColumn } from './csv-text.js';

interface ChangeRow {
  change: Change;
  commit: string;
  date: string;
  counted: boolean;
  included: boolean;
}

/** Columns of changes.csv: one row per change. */
export const CHANGE_COLUMNS: readonly CsvColumn<ChangeRow>[] = [
  { name: 'version', type: 'integer', description: 'Index of the version at which the change is seen.', value: (r) => r.change.version },
  { name: 'commit', type: 'string', description: 'Commit of that version.', value: (r) => r.commit },
  { name: 'date', type: 'date-time', description: 'Committer date of that version, ISO 8601.', value: (r) => r.date },
  { name: 'table', type: 'string', description: 'Stable id of the table.', value: (r) => r.change.table },
  { name: 'kind', type: 'string', description: 'Change kind.', value: (r) => r.change.kind },
  { name: 'column', type: 'string', description: 'Column, for column changes.', value: (r) => r.change.column },
  { name: 'foreign_key', type: 'string', description: 'Referencing columns, comma-separated, for foreign-key changes.', value: (r) => r.change.foreignKey },
  { name: 'before', type: 'string', description: 'Value before the change, as text.', value: (r) => r.change.before },
  { name: 'after', type: 'string', description: 'Value after the change, as text.', value: (r) => r.change.after },
  { name: 'basis', type: 'string', description: 'For renames: `stated` by the ORM code, or `heuristic`.', value: (r) => r.change.basis },
  { name: 'evidence', type: 'string', description: 'For heuristic renames: what the match rests on.', value: (r) => r.change.evidence },
  { name: 'counted', type: 'boolean', description: 'Whether the change is a counted update.', value: (r) => r.counted },
  { name: 'included', type: 'boolean', description: 'Whether its table is in the measures.', value: (r) => r.included },
];

export function changesCsv(doc: InterchangeDocument, a: Analysis): string {
  const counted = new Set<string>(a.options.count);
  const included = new Set(a.tables.filter((t) => t.included).map((t) => t.id));
  const rows = doc.changes.map((change) => {
    const v = doc.versions[change.version]!;
    return { change, commit: v.commit, date: v.committerTime, counted: counted.has(change.kind), included: included.has(change.table) };
  });
  return csvText(CHANGE_COLUMNS, rows);
}
