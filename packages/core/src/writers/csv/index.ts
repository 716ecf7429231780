import type { Analysis } from '../../analysis/types.js';
import type { InterchangeDocument } from '../../interchange/document.js';
import { changesCsv } from './changes-csv.js';
import { tablesCsv } from './tables-csv.js';
import { versionsCsv } from './versions-csv.js';

export { TABLE_COLUMNS } from './tables-csv.js';
export { CHANGE_COLUMNS } from './changes-csv.js';
export { VERSION_COLUMNS } from './versions-csv.js';
export type { CsvColumn } from './csv-text.js';

/** The three CSV files of an analysed history: name -> text. */
export function csvFiles(doc: InterchangeDocument, a: Analysis): Array<{ path: string; content: string }> {
  return [
    { path: 'tables.csv', content: tablesCsv(a) },
    { path: 'changes.csv', content: changesCsv(doc, a) },
    { path: 'versions.csv', content: versionsCsv(a) },
  ];
}
