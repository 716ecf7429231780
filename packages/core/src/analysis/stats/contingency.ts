/** A two-way table of counts with its margins, percentages and expected counts. */
export interface ContingencyTable {
  rowVariable: string;
  columnVariable: string;
  rows: string[];
  columns: string[];
  counts: number[][];
  rowTotals: number[];
  columnTotals: number[];
  total: number;
  /** Percent of the row total (null where the row total is 0). */
  rowPercent: Array<Array<number | null>>;
  /** Percent of the column total (null where the column total is 0). */
  columnPercent: Array<Array<number | null>>;
  /** Percent of the grand total (null when it is 0). */
  totalPercent: Array<Array<number | null>>;
  /** Counts expected under independence: row total x column total / total. */
  expected: number[][];
  /** Rows and columns whose counts are all zero: left out of the tests. */
  droppedRows: string[];
  droppedColumns: string[];
}

const pct = (x: number, of: number): number | null => (of === 0 ? null : (100 * x) / of);

/** Cross-tabulate labelled units. Rows and columns keep the order given; labels not listed are not counted. */
export function crossTabulate(
  units: ReadonlyArray<readonly [string, string]>,
  rows: readonly string[],
  columns: readonly string[],
  names: { rows: string; columns: string },
): ContingencyTable {
  const counts = rows.map(() => columns.map(() => 0));
  const ri = new Map(rows.map((r, i) => [r, i]));
  const ci = new Map(columns.map((c, i) => [c, i]));
  for (const [r, c] of units) {
    const i = ri.get(r);
    const j = ci.get(c);
    if (i !== undefined && j !== undefined) counts[i]![j]!++;
  }
  return fromCounts(counts, rows, columns, names);
}

/** A contingency table from a matrix of counts. */
export function fromCounts(counts: number[][], rows: readonly string[], columns: readonly string[], names: { rows: string; columns: string }): ContingencyTable {
  const rowTotals = counts.map((r) => r.reduce((a, b) => a + b, 0));
  const columnTotals = columns.map((_, j) => counts.reduce((a, r) => a + r[j]!, 0));
  const total = rowTotals.reduce((a, b) => a + b, 0);
  return {
    rowVariable: names.rows,
    columnVariable: names.columns,
    rows: [...rows],
    columns: [...columns],
    counts,
    rowTotals,
    columnTotals,
    total,
    rowPercent: counts.map((r, i) => r.map((x) => pct(x, rowTotals[i]!))),
    columnPercent: counts.map((r) => r.map((x, j) => pct(x, columnTotals[j]!))),
    totalPercent: counts.map((r) => r.map((x) => pct(x, total))),
    expected: counts.map((r, i) => r.map((_, j) => (total === 0 ? 0 : (rowTotals[i]! * columnTotals[j]!) / total))),
    droppedRows: rows.filter((_, i) => rowTotals[i] === 0),
    droppedColumns: columns.filter((_, j) => columnTotals[j] === 0),
  };
}

/** The counts the tests use: all-zero rows and columns left out. */
export function testedCounts(t: ContingencyTable): number[][] {
  const keepC = t.columnTotals.map((n) => n > 0);
  return t.counts.filter((_, i) => t.rowTotals[i]! > 0).map((r) => r.filter((_, j) => keepC[j]));
}
