import { distance } from 'fastest-levenshtein';
import { formatType, sameType } from '../model/canonical.js';
import type { Table } from '../model/types.js';
import { AliasState } from './aliases.js';
import { diffSnapshots } from './diff-snapshots.js';
import { columnKey } from './diff-tables.js';
import type { Change } from './kinds.js';

/** How renames are found: only those the ORM code states, or also by the heuristic. */
export type RenameMode = 'stated' | 'heuristic';

/** Default acceptance threshold of the rename heuristic (a choice of this project; see docs/measures.md). */
export const DEFAULT_RENAME_THRESHOLD = 0.7;
/** A table rename also needs at least this share of its columns in common (Jaccard overlap of column names). */
export const MIN_COLUMN_OVERLAP = 0.5;

/** One rename the heuristic found, with what it rests on. */
export interface RenameMatch {
  version: number;
  kind: 'table' | 'column';
  /** Stable id of the table (the id it keeps). */
  table: string;
  /** Old and new name: the table's qualified names, or the column's names. */
  from: string;
  to: string;
  /** Similarity of the names: 1 - Levenshtein distance / length of the longer name. */
  nameSimilarity: number;
  /** Tables: Jaccard overlap of the column names (shared / all). */
  columnOverlap?: number;
  /** Tables: the mean of name similarity and column overlap; columns: the name similarity. */
  score: number;
  evidence: string;
}

/** One version of a history as the heuristic reads it: its tables, or null when the schema is absent. */
export interface HistoryStep {
  index: number;
  /** Equal keys mean the same schema (no changes); null when absent. */
  key: string | null;
  tables: readonly Table[];
}

/** Similarity of two names: 1 - Levenshtein distance / length of the longer one (1 for equal names). */
export function nameSimilarity(a: string, b: string): number {
  const n = Math.max(a.length, b.length);
  return n === 0 ? 1 : 1 - distance(a, b) / n;
}

const qualified = (t: Table): string => (t.namespace ? `${t.namespace}.${t.name}` : t.name);
const f2 = (x: number): string => x.toFixed(2);
const byStr = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);

interface Candidate<T> {
  removed: T;
  added: T;
  score: number;
  match: Omit<RenameMatch, 'version'>;
}

/** Best pairs first; each side used once; ties broken by the names, so the result is deterministic. */
function greedy<T>(cands: Candidate<T>[], keyR: (t: T) => string, keyA: (t: T) => string): Candidate<T>[] {
  cands.sort((x, y) => y.score - x.score || byStr(keyR(x.removed), keyR(y.removed)) || byStr(keyA(x.added), keyA(y.added)));
  const usedR = new Set<string>();
  const usedA = new Set<string>();
  const out: Candidate<T>[] = [];
  for (const c of cands) {
    if (usedR.has(keyR(c.removed)) || usedA.has(keyA(c.added))) continue;
    usedR.add(keyR(c.removed));
    usedA.add(keyA(c.added));
    out.push(c);
  }
  return out;
}

function tableCandidates(prev: readonly Table[], cur: readonly Table[], threshold: number): Candidate<Table>[] {
  const prevIds = new Set(prev.map((t) => t.id));
  const curIds = new Set(cur.map((t) => t.id));
  const removed = prev.filter((t) => !curIds.has(t.id));
  const added = cur.filter((t) => !prevIds.has(t.id));
  const out: Candidate<Table>[] = [];
  for (const r of removed) {
    const rc = new Set(r.columns.map((c) => c.name));
    for (const a of added) {
      if (a.kind !== r.kind) continue;
      const ac = a.columns.map((c) => c.name);
      const shared = ac.filter((c) => rc.has(c)).length;
      const union = rc.size + ac.length - shared;
      const overlap = union === 0 ? 1 : shared / union;
      const sim = nameSimilarity(r.name, a.name);
      const score = (sim + overlap) / 2;
      if (overlap < MIN_COLUMN_OVERLAP || score < threshold) continue;
      out.push({
        removed: r, added: a, score,
        match: {
          kind: 'table', table: r.id, from: qualified(r), to: qualified(a), nameSimilarity: sim, columnOverlap: overlap, score,
          evidence: `name similarity ${f2(sim)} (${qualified(r)} -> ${qualified(a)}), ${shared} of ${union} column names shared (overlap ${f2(overlap)}), score ${f2(score)} >= ${f2(threshold)}`,
        },
      });
    }
  }
  return greedy(out, (t) => t.id, (t) => t.id);
}

type Col = { table: string; name: string; key: string; type: string };

function columnCandidates(prev: readonly Table[], cur: readonly Table[], threshold: number): Candidate<Col>[] {
  const prevById = new Map(prev.map((t) => [t.id, t]));
  const all: Candidate<Col>[] = [];
  for (const a of cur) {
    const b = prevById.get(a.id);
    if (!b) continue;
    const aKeys = new Set(a.columns.map(columnKey));
    const bKeys = new Set(b.columns.map(columnKey));
    const removed = b.columns.filter((c) => !aKeys.has(columnKey(c)));
    const added = a.columns.filter((c) => !bKeys.has(columnKey(c)));
    const cands: Candidate<Col>[] = [];
    for (const rc of removed) {
      for (const ac of added) {
        if (!sameType(rc.type, ac.type)) continue;
        const sim = nameSimilarity(rc.name, ac.name);
        if (sim < threshold) continue;
        cands.push({
          removed: { table: a.id, name: rc.name, key: columnKey(rc), type: formatType(rc.type) },
          added: { table: a.id, name: ac.name, key: columnKey(ac), type: formatType(ac.type) },
          score: sim,
          match: {
            kind: 'column', table: a.id, from: rc.name, to: ac.name, nameSimilarity: sim, score: sim,
            evidence: `same type ${formatType(ac.type)}, name similarity ${f2(sim)} (${rc.name} -> ${ac.name}) >= ${f2(threshold)}`,
          },
        });
      }
    }
    all.push(...greedy(cands, (c) => c.name, (c) => c.name));
  }
  return all;
}

/**
 * True when giving the physical table `physical` the stable id `stable` from step `at` on would
 * clash: a table of that id appears again while the renamed one still lives.
 */
function clashes(steps: readonly HistoryStep[], at: number, physical: string, stable: string): boolean {
  for (let j = at + 1; j < steps.length; j++) {
    const s = steps[j]!;
    if (s.key === null) continue;
    let hasPhysical = false;
    let hasStable = false;
    for (const t of s.tables) {
      if (t.id === physical) hasPhysical = true;
      if (t.id === stable) hasStable = true;
    }
    if (!hasPhysical) return false;
    if (hasStable) return true;
  }
  return false;
}

/**
 * Changes of a whole history with heuristic rename detection: between consecutive versions, a
 * removed table and an added one whose names are similar and whose columns overlap are taken for
 * one table renamed (it keeps its id), and in a table that is in both, a removed column and an
 * added one of the same type with similar names for one column renamed. Every match is reported
 * with its evidence; the changes carry `basis: 'heuristic'` and the evidence. A rename counts once
 * as a rename: the foreign keys that point at a renamed table, and the key and foreign keys over a
 * renamed column, do not change because of it.
 */
export function detectRenames(steps: readonly HistoryStep[], opts: { threshold?: number } = {}): { changes: Change[]; matches: RenameMatch[] } {
  const threshold = opts.threshold ?? DEFAULT_RENAME_THRESHOLD;
  const state = new AliasState();
  const changes: Change[] = [];
  const matches: RenameMatch[] = [];
  let prev: Table[] | null = null;
  let prevKey: string | null = null;
  steps.forEach((step, i) => {
    if (step.key === null) return;
    if (prev && step.key === prevKey) return;
    state.prune(step.tables);
    let cur = state.apply(step.tables);
    const found: RenameMatch[] = [];
    if (prev) {
      for (const c of tableCandidates(prev, cur, threshold)) {
        if (clashes(steps, i, c.added.id, c.removed.id)) continue;
        state.addTable(c.added.id, c.removed.id);
        found.push({ version: step.index, ...c.match });
      }
      if (found.length > 0) cur = state.apply(step.tables);
      const cols = columnCandidates(prev, cur, threshold);
      for (const c of cols) {
        state.addColumn(c.added.table, c.added.name, c.removed.key);
        found.push({ version: step.index, ...c.match });
      }
      if (cols.length > 0) cur = state.apply(step.tables);
    }
    const diff = diffSnapshots(step.index, prev ? { tables: prev.map((t) => ({ table: t })) } : null, { tables: cur.map((t) => ({ table: t })) });
    for (const ch of diff) {
      const m =
        ch.kind === 'table-renamed'
          ? found.find((f) => f.kind === 'table' && f.table === ch.table)
          : ch.kind === 'column-renamed'
            ? found.find((f) => f.kind === 'column' && f.table === ch.table && f.to === ch.column)
            : undefined;
      if (m) {
        ch.basis = 'heuristic';
        ch.evidence = m.evidence;
      }
    }
    changes.push(...diff);
    matches.push(...found);
    prev = cur;
    prevKey = step.key;
  });
  return { changes, matches };
}
