import type { Analysis } from '../../analysis/types.js';
import type { InterchangeDocument } from '../../interchange/document.js';
import { CHANGE_COLUMNS, changesCsv } from './changes-csv.js';
import type { CsvColumn } from './csv-text.js';
import { TABLE_COLUMNS, tablesCsv } from './tables-csv.js';
import { VERSION_COLUMNS, versionsCsv } from './versions-csv.js';
import { studyCsvFields } from '../../study/study-csv.js';

export { TABLE_COLUMNS } from './tables-csv.js';
export { CHANGE_COLUMNS } from './changes-csv.js';
export { VERSION_COLUMNS } from './versions-csv.js';
export type { CsvColumn } from './csv-text.js';

/** The CSV files and their columns, for the codebook (packages/core/schema/csv-fields.json). */
export function csvFieldsDocument(): { description: string; files: Record<string, { description: string; columns: Array<{ name: string; type: string; description: string }> }> } {
  const cols = (c: readonly CsvColumn<never>[]) => c.map(({ name, type, description }) => ({ name, type, description }));
  return {
    description:
      'Written by `schema-strata export history.json --format csv -o DIR`: RFC 4180 (header row, CRLF line ends, fields quoted when they hold a comma, a quote or a line break), ISO 8601 dates, empty fields for null, booleans as true/false.',
    files: {
      'tables.csv': { description: 'One row per table that ever existed, with every measure.', columns: cols(TABLE_COLUMNS as readonly CsvColumn<never>[]) },
      'changes.csv': { description: 'One row per change between consecutive versions.', columns: cols(CHANGE_COLUMNS as readonly CsvColumn<never>[]) },
      'versions.csv': { description: 'One row per version: the growth curve.', columns: cols(VERSION_COLUMNS as readonly CsvColumn<never>[]) },
      ...studyCsvFields(),
    },
  };
}

/** The three CSV files of an analysed history: name -> text. */
export function csvFiles(doc: InterchangeDocument, a: Analysis): Array<{ path: string; content: string }> {
  return [
    { path: 'tables.csv', content: tablesCsv(a) },
    { path: 'changes.csv', content: changesCsv(doc, a) },
    { path: 'versions.csv', content: versionsCsv(a) },
  ];
}
