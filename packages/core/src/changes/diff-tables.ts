import { enumValues, formatType, sameType } from '../model/canonical.js';
import type { Column, ForeignKey, Table } from '../model/types.js';
import type { Change } from './kinds.js';
import { KIND_ORDER } from './kinds.js';

/** Identity of a column within its table: its stated id, else its physical name. */
export function columnKey(c: Column): string {
  return c.id ?? c.name;
}

/** Text form of a foreign key, for change records: `(a,b) -> t(x,y) on delete cascade`. */
export function formatForeignKey(fk: ForeignKey): string {
  let s = `(${fk.columns.join(',')}) -> ${fk.referencedTable}(${fk.referencedColumns.join(',')})`;
  if (fk.onDelete) s += ` on delete ${fk.onDelete}`;
  if (fk.onUpdate) s += ` on update ${fk.onUpdate}`;
  if (fk.enforcement === 'orm') s += ' [orm only]';
  return s;
}

function singleUniques(t: Table): Set<string> {
  const s = new Set<string>();
  for (const u of t.uniques) if (u.columns.length === 1) s.add(u.columns[0]!);
  return s;
}

/** Column renames between two versions of a table: map from the old physical name to the new one. */
function columnRenames(before: Table, after: Table): Map<string, string> {
  const m = new Map<string, string>();
  const afterByKey = new Map(after.columns.map((c) => [columnKey(c), c]));
  for (const c of before.columns) {
    const a = afterByKey.get(columnKey(c));
    if (a && a.name !== c.name) m.set(c.name, a.name);
  }
  return m;
}

const mapNames = (names: string[], m: Map<string, string>): string[] => names.map((n) => m.get(n) ?? n);

export interface DiffContext {
  /** Column renames of every table that changed in this version, by table id (old name -> new name). */
  renamesByTable: Map<string, Map<string, string>>;
}

/**
 * Changes between two versions of the same table (same id). A rename counts once, as a rename:
 * the primary-key and foreign-key changes it implies are not reported.
 */
export function diffTable(version: number, before: Table, after: Table, ctx: DiffContext): Change[] {
  const out: Change[] = [];
  const table = after.id;
  if (before.name !== after.name || before.namespace !== after.namespace) {
    out.push({
      version, kind: 'table-renamed', table,
      before: before.namespace ? `${before.namespace}.${before.name}` : before.name,
      after: after.namespace ? `${after.namespace}.${after.name}` : after.name,
      basis: 'stated',
    });
  }
  const renames = ctx.renamesByTable.get(table) ?? columnRenames(before, after);
  const beforeByKey = new Map(before.columns.map((c) => [columnKey(c), c]));
  const afterByKey = new Map(after.columns.map((c) => [columnKey(c), c]));
  const uBefore = singleUniques(before);
  const uAfter = singleUniques(after);

  for (const c of before.columns) {
    if (!afterByKey.has(columnKey(c))) {
      out.push({ version, kind: 'column-removed', table, column: c.name, before: formatType(c.type) });
    }
  }
  for (const a of after.columns) {
    const b = beforeByKey.get(columnKey(a));
    if (!b) {
      out.push({ version, kind: 'column-added', table, column: a.name, after: formatType(a.type) });
      continue;
    }
    const column = a.name;
    if (b.name !== a.name) {
      out.push({ version, kind: 'column-renamed', table, column, before: b.name, after: a.name, basis: 'stated' });
    }
    if (!sameType(b.type, a.type)) {
      out.push({ version, kind: 'column-type-changed', table, column, before: formatType(b.type), after: formatType(a.type) });
    }
    const ev = enumValues(b.type);
    const av = enumValues(a.type);
    if (ev && av && ev.join('\u0000') !== av.join('\u0000')) {
      out.push({ version, kind: 'column-enum-values-changed', table, column, before: ev.join('|'), after: av.join('|') });
    }
    if (b.nullable !== a.nullable) {
      out.push({
        version, kind: 'column-nullability-changed', table, column,
        before: b.nullable ? 'nullable' : 'not null', after: a.nullable ? 'nullable' : 'not null',
      });
    }
    if ((b.default ?? null) !== (a.default ?? null)) {
      const ch: Change = { version, kind: 'column-default-changed', table, column };
      if (b.default !== undefined) ch.before = b.default;
      if (a.default !== undefined) ch.after = a.default;
      out.push(ch);
    }
    const wasUnique = uBefore.has(b.name);
    const isUnique = uAfter.has(a.name);
    if (wasUnique !== isUnique) {
      out.push({
        version, kind: 'column-unique-changed', table, column,
        before: wasUnique ? 'unique' : 'not unique', after: isUnique ? 'unique' : 'not unique',
      });
    }
  }

  const pkBefore = mapNames(before.primaryKey, renames);
  if (pkBefore.join('\u0000') !== after.primaryKey.join('\u0000')) {
    out.push({
      version, kind: 'primary-key-changed', table,
      before: `(${before.primaryKey.join(',')})`, after: `(${after.primaryKey.join(',')})`,
    });
  }

  // Foreign keys: identity is (table, ordered columns), columns seen through this version's renames.
  const fkId = (cols: string[]): string => cols.join(',');
  const fkBefore = new Map<string, ForeignKey>();
  for (const fk of before.foreignKeys) fkBefore.set(fkId(mapNames(fk.columns, renames)), fk);
  const fkAfter = new Map<string, ForeignKey>();
  for (const fk of after.foreignKeys) fkAfter.set(fkId(fk.columns), fk);
  for (const [id, fk] of fkBefore) {
    if (!fkAfter.has(id)) out.push({ version, kind: 'foreign-key-removed', table, foreignKey: fkId(fk.columns), before: formatForeignKey(fk) });
  }
  for (const [id, fk] of fkAfter) {
    const b = fkBefore.get(id);
    if (!b) {
      out.push({ version, kind: 'foreign-key-added', table, foreignKey: id, after: formatForeignKey(fk) });
      continue;
    }
    const refRenames = ctx.renamesByTable.get(fk.referencedTable) ?? new Map<string, string>();
    const same =
      b.referencedTable === fk.referencedTable &&
      mapNames(b.referencedColumns, refRenames).join('\u0000') === fk.referencedColumns.join('\u0000') &&
      (b.onDelete ?? null) === (fk.onDelete ?? null) &&
      (b.onUpdate ?? null) === (fk.onUpdate ?? null) &&
      b.enforcement === fk.enforcement;
    if (!same) {
      out.push({ version, kind: 'foreign-key-changed', table, foreignKey: id, before: formatForeignKey(b), after: formatForeignKey(fk) });
    }
  }
  return out;
}

/** Sort changes by table, then kind, then column (stable, deterministic). */
export function sortChanges(changes: Change[]): Change[] {
  return changes.sort((a, b) => {
    if (a.version !== b.version) return a.version - b.version;
    if (a.table !== b.table) return a.table < b.table ? -1 : 1;
    const k = KIND_ORDER[a.kind] - KIND_ORDER[b.kind];
    if (k !== 0) return k;
    const ca = a.column ?? a.foreignKey ?? '';
    const cb = b.column ?? b.foreignKey ?? '';
    return ca < cb ? -1 : ca > cb ? 1 : 0;
  });
}

/** Column renames of a table between two versions (exported for the snapshot-level diff). */
export { columnRenames };
