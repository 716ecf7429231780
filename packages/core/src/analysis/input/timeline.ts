import { AliasState, keyOfColumn } from '../../changes/aliases.js';
import type { Change } from '../../changes/kinds.js';
import type { HistoryStep } from '../../changes/rename-heuristic.js';
import type { VersionStatus } from '../../history/engine.js';
import type { InterchangeDocument } from '../../interchange/document.js';
import type { Table } from '../../model/types.js';

/** One version as the analysis sees it. */
export interface TimelineVersion {
  index: number;
  commit: string;
  /** Committer date as written (ISO 8601 with offset). */
  date: string;
  /** Committer date in milliseconds since the epoch. */
  time: number;
  status: VersionStatus;
  /**
   * Tables of the version with stable ids, sorted by id. A version whose schema is absent keeps
   * the tables of the last version that had one (absence is not emptiness: nothing was removed).
   */
  tables: readonly Table[];
  /** Equal keys mean the same tables (the same objects). */
  key: string;
}

/** The input of every measure: versions in order, and the changes between them. */
export interface Timeline {
  versions: TimelineVersion[];
  changes: readonly Change[];
}

/** The steps of a document for the rename heuristic: the tables of each version, null when absent. */
export function documentSteps(doc: InterchangeDocument): HistoryStep[] {
  const memo = new Map<string, Table[]>();
  return doc.versions.map((v) => {
    if (!v.snapshot) return { index: v.index, key: null, tables: [] };
    const s = doc.snapshots[v.snapshot]!;
    let tables = memo.get(v.snapshot);
    if (!tables) memo.set(v.snapshot, (tables = s.tables.map((h) => doc.tables[h]!)));
    return { index: v.index, key: s.meaningHash, tables };
  });
}

/**
 * The timeline of an interchange document. Renames that the heuristic found (changes with
 * `basis: 'heuristic'`) are replayed, so that a renamed table or column keeps its stable id in
 * every version after the rename, as it does in the changes.
 */
export function timelineOf(doc: InterchangeDocument): Timeline {
  const steps = documentSteps(doc);
  const heuristic = new Map<number, Change[]>();
  for (const c of doc.changes) {
    if (c.basis !== 'heuristic') continue;
    const list = heuristic.get(c.version) ?? [];
    list.push(c);
    heuristic.set(c.version, list);
  }
  const state = new AliasState();
  const versions: TimelineVersion[] = [];
  let prev: TimelineVersion | null = null;
  for (const v of doc.versions) {
    const step = steps[v.index]!;
    let tables: readonly Table[];
    let key: string;
    if (step.key === null) {
      tables = prev ? prev.tables : [];
      key = prev ? prev.key : 'empty';
    } else {
      const renames = heuristic.get(v.index) ?? [];
      state.prune(step.tables);
      for (const c of renames) if (c.kind === 'table-renamed' && c.after) state.addTable(c.after, c.table);
      const prevById = new Map((prev?.tables ?? []).map((t) => [t.id, t]));
      for (const c of renames) {
        if (c.kind !== 'column-renamed' || !c.before || !c.after) continue;
        const old = prevById.get(c.table);
        state.addColumn(c.table, c.after, (old && keyOfColumn(old, c.before)) ?? c.before);
      }
      tables = state.apply(step.tables);
      // applied aliases make new table objects, the same ones while the aliases stay as they are
      key = state.empty ? v.snapshot! : `${v.snapshot}@${state.generation}`;
    }
    const tv: TimelineVersion = {
      index: v.index,
      commit: v.commit,
      date: v.committerTime,
      time: Date.parse(v.committerTime),
      status: v.status,
      tables,
      key,
    };
    versions.push(tv);
    prev = tv;
  }
  return { versions, changes: doc.changes };
}
