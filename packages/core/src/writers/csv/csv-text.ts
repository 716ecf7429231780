import { stringify } from 'csv-stringify/sync';

/** One column of a CSV file: its header, what it holds (for the codebook), and how to read it from a record. */
export interface CsvColumn<T> {
  name: string;
  /** What a field holds: string, integer, number, boolean (`true`/`false`) or date-time (ISO 8601). Empty fields are null. */
  type: 'string' | 'integer' | 'number' | 'boolean' | 'date-time';
  description: string;
  value(record: T): string | number | boolean | null | undefined;
}

/**
 * CSV text after RFC 4180: a header row, CRLF line ends, a field quoted when it holds a comma,
 * a double quote or a line break (quotes doubled inside). Empty fields for null and undefined;
 * booleans as `true` / `false`; numbers as JavaScript writes them (shortest round-trip form).
 */
export function csvText<T>(columns: readonly CsvColumn<T>[], records: readonly T[]): string {
  return stringify(
    records.map((r) => columns.map((c) => c.value(r))),
    {
      header: true,
      columns: columns.map((c) => c.name),
      record_delimiter: 'windows',
      // a lone line feed is a line break to most readers: quote it as RFC 4180 asks for line breaks
      quoted_match: /[\r\n]/,
      cast: { boolean: (v: boolean) => (v ? 'true' : 'false'), number: (v: number) => String(v) },
    },
  );
}

/** A change kind as part of a column name: `column-added` -> `column_added`. */
export const under = (k: string): string => k.replace(/-/g, '_');
