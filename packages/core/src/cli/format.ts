import { formatType } from '../model/canonical.js';
import type { Diagnostic, Table, ViewRef } from '../model/types.js';
import type { InterchangeDocument } from '../interchange/document.js';
import { formatForeignKey } from '../changes/diff-tables.js';

export interface Style {
  bold(s: string): string;
  dim(s: string): string;
}

export const plainStyle: Style = { bold: (s) => s, dim: (s) => s };
export const colorStyle: Style = { bold: (s) => `\u001b[1m${s}\u001b[22m`, dim: (s) => `\u001b[2m${s}\u001b[22m` };

/** Lay out rows as aligned columns (the last column is not padded). */
export function alignRows(rows: string[][], indent = ''): string[] {
  const widths: number[] = [];
  for (const r of rows) r.forEach((c, i) => (widths[i] = Math.max(widths[i] ?? 0, c.length)));
  return rows.map((r) => indent + r.map((c, i) => (i === r.length - 1 ? c : c.padEnd(widths[i]!))).join('  ').trimEnd());
}

/** The rebuilt schema as text: one block per table, aligned columns, keys and foreign keys. */
export function formatSchema(tables: Table[], views: ViewRef[], style: Style = plainStyle): string {
  const out: string[] = [];
  for (const t of tables) {
    const bits = [t.ormName && t.ormName !== t.name ? `${t.kind === 'implicit-join' ? 'implicit join of' : 'from'} ${t.ormName}` : '', t.kind === 'implicit-join' && (!t.ormName || t.ormName === t.name) ? 'implicit join table' : '', t.origin ? `${t.origin.file}${t.origin.line ? `:${t.origin.line}` : ''}` : '']
      .filter(Boolean)
      .join(', ');
    out.push(`${style.bold(t.id)}${bits ? style.dim(`  (${bits})`) : ''}`);
    const singleUnique = new Set(t.uniques.filter((u) => u.columns.length === 1).map((u) => u.columns[0]));
    const rows = t.columns.map((c) => [
      c.name,
      formatType(c.type),
      c.nullable ? 'null' : 'not null',
      [
        t.primaryKey.length === 1 && t.primaryKey[0] === c.name ? 'primary key' : '',
        singleUnique.has(c.name) ? 'unique' : '',
        c.default !== undefined ? `default ${c.default}` : '',
        c.generated && c.default === undefined ? `generated ${c.generated}` : '',
      ].filter(Boolean).join(', '),
      style.dim(c.nativeType),
    ]);
    out.push(...alignRows(rows, '  '));
    if (t.primaryKey.length > 1) out.push(`  primary key (${t.primaryKey.join(', ')})`);
    for (const u of t.uniques) if (u.columns.length > 1) out.push(`  unique (${u.columns.join(', ')})${u.name ? ` ${u.name}` : ''}`);
    for (const fk of t.foreignKeys) out.push(`  foreign key ${formatForeignKey(fk)}`);
    out.push('');
  }
  if (views.length > 0) out.push(`views (not counted as tables): ${views.map((v) => v.id).join(', ')}`, '');
  return out.join('\n');
}

export function formatDiagnostic(d: Diagnostic): string {
  const where = d.file ? `${d.file}${d.line ? `:${d.line}` : ''}: ` : '';
  return `${d.severity}: ${where}${d.message} [${d.code}]`;
}

/** One or two lines saying how many diagnostics of each code the run had. */
export function summariseDiagnostics(doc: InterchangeDocument): string {
  const counts = new Map<string, number>();
  const all = [...doc.diagnostics, ...doc.versions.flatMap((v) => v.diagnostics)];
  for (const d of all) counts.set(d.code, (counts.get(d.code) ?? 0) + 1);
  if (counts.size === 0) return '';
  return `diagnostics: ${[...counts.entries()].sort().map(([c, n]) => `${n} ${c}`).join(', ')} (see "diagnostics" in the file)`;
}
