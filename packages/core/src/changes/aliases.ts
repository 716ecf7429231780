import type { Table } from '../model/types.js';
import { columnKey } from './diff-tables.js';

/**
 * Identities that the heuristic rename detection gave: a table known by a new physical name
 * keeps the id of the table it was renamed from, and a column the key of the column it was
 * renamed from, for as long as the new name lives. Applying the state to a version's tables
 * gives tables whose ids (and foreign-key targets, and column ids) are the stable ones, as an
 * adapter that states renames would have written them.
 */
export class AliasState {
  /** Physical table id -> stable id. */
  private readonly tables = new Map<string, string>();
  /** Stable table id -> (physical column name -> column key). */
  private readonly columns = new Map<string, Map<string, string>>();
  private cache = new WeakMap<Table, Table>();
  /** Grows whenever the aliases change (applied tables are then new objects). */
  generation = 0;

  private reset(): void {
    this.cache = new WeakMap();
    this.generation++;
  }

  get empty(): boolean {
    return this.tables.size === 0 && this.columns.size === 0;
  }

  /** The stable id of a physical table id. */
  idOf(physical: string): string {
    return this.tables.get(physical) ?? physical;
  }

  addTable(physical: string, stable: string): void {
    this.tables.set(physical, stable);
    this.reset();
  }

  addColumn(stableTable: string, physicalColumn: string, key: string): void {
    let m = this.columns.get(stableTable);
    if (!m) this.columns.set(stableTable, (m = new Map()));
    m.set(physicalColumn, key);
    this.reset();
  }

  /** Forget aliases whose physical table or column is not in `raw` (the version's own tables). */
  prune(raw: readonly Table[]): void {
    if (this.empty) return;
    const byId = new Map(raw.map((t) => [t.id, t]));
    let changed = false;
    for (const physical of [...this.tables.keys()]) {
      if (!byId.has(physical)) {
        this.tables.delete(physical);
        changed = true;
      }
    }
    const physicalOf = new Map<string, string>();
    for (const t of raw) physicalOf.set(this.idOf(t.id), t.id);
    for (const [stable, cols] of [...this.columns.entries()]) {
      const p = physicalOf.get(stable);
      const t = p !== undefined ? byId.get(p) : undefined;
      const names = new Set(t ? t.columns.map((c) => c.name) : []);
      for (const name of [...cols.keys()]) {
        if (!names.has(name)) {
          cols.delete(name);
          changed = true;
        }
      }
      if (cols.size === 0) this.columns.delete(stable);
    }
    if (changed) this.reset();
  }

  /** One table with stable ids; the same object when no alias touches it. */
  applyTable(t: Table): Table {
    if (this.empty) return t;
    const hit = this.cache.get(t);
    if (hit) return hit;
    const id = this.idOf(t.id);
    const cols = this.columns.get(id);
    const fkTouched = t.foreignKeys.some((fk) => this.tables.has(fk.referencedTable));
    let out = t;
    if (id !== t.id || cols || fkTouched) {
      out = {
        ...t,
        id,
        columns: cols ? t.columns.map((c) => (cols.has(c.name) && c.id === undefined ? { ...c, id: cols.get(c.name)! } : c)) : t.columns,
        foreignKeys: fkTouched ? t.foreignKeys.map((fk) => ({ ...fk, referencedTable: this.idOf(fk.referencedTable) })) : t.foreignKeys,
      };
    }
    this.cache.set(t, out);
    return out;
  }

  /** A version's tables with stable ids, sorted by id. */
  apply(raw: readonly Table[]): Table[] {
    if (this.empty) return raw as Table[];
    const out = raw.map((t) => this.applyTable(t));
    return out.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  }
}

/** The key of a column of a table by its physical name (for recording a column alias). */
export function keyOfColumn(t: Table, name: string): string | undefined {
  const c = t.columns.find((x) => x.name === name);
  return c ? columnKey(c) : undefined;
}
