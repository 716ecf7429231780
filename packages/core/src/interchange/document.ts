import type { Change } from '../changes/kinds.js';
import type { History, VersionRecord } from '../history/engine.js';
import { withOrigins } from '../history/snapshot-store.js';
import type { Diagnostic, Table, ViewRef } from '../model/types.js';

export const FORMAT_NAME = 'schema-strata-history';
export const FORMAT_VERSION = '1.0.0';

export interface InterchangeSnapshot {
  meaningHash: string;
  tables: string[];
  views: ViewRef[];
}

/** The interchange document (see packages/core/schema/history.schema.json). */
export interface InterchangeDocument {
  format: typeof FORMAT_NAME;
  formatVersion: string;
  generator: { name: string; version: string };
  source: {
    repository: string;
    ref: string;
    head: string;
    adapter: { name: string; version: string; source?: string };
    paths: string[];
    options: Record<string, unknown>;
    window: { since?: string; until?: string };
  };
  summary: {
    versions: number;
    firstCommit: string;
    lastCommit: string;
    firstDate: string;
    lastDate: string;
    distinctSnapshots: number;
    distinctTables: number;
    tableIds: number;
    changes: number;
    statuses: Record<string, number>;
  };
  versions: VersionRecord[];
  snapshots: Record<string, InterchangeSnapshot>;
  tables: Record<string, Table>;
  changes: Change[];
  diagnostics: Diagnostic[];
  analysis?: unknown;
}

/** Build the interchange document of a history. Deterministic: only the history's content decides it. */
export function toDocument(h: History, generator: { name: string; version: string }): InterchangeDocument {
  const snapshots: Record<string, InterchangeSnapshot> = {};
  const tables: Record<string, Table> = {};
  const ids = new Set<string>();
  const statuses: Record<string, number> = {};
  for (const v of h.versions) {
    statuses[v.status] = (statuses[v.status] ?? 0) + 1;
    if (!v.snapshot || snapshots[v.snapshot]) continue;
    const s = h.snapshots.get(v.snapshot)!;
    snapshots[s.hash] = { meaningHash: s.meaningHash, tables: s.tables.map((t) => t.hash), views: s.views };
    for (const st of s.tables) {
      ids.add(st.table.id);
      if (!tables[st.hash]) tables[st.hash] = withOrigins(st.table, h.tableOrigins.get(st.hash));
    }
  }
  const first = h.versions[0]!;
  const last = h.versions[h.versions.length - 1]!;
  return {
    format: FORMAT_NAME,
    formatVersion: FORMAT_VERSION,
    generator,
    source: {
      repository: h.repository,
      ref: h.ref,
      head: h.head,
      adapter: h.adapter,
      paths: h.paths,
      options: h.adapterOptions,
      window: h.window,
    },
    summary: {
      versions: h.versions.length,
      firstCommit: first.commit,
      lastCommit: last.commit,
      firstDate: first.committerTime,
      lastDate: last.committerTime,
      distinctSnapshots: Object.keys(snapshots).length,
      distinctTables: Object.keys(tables).length,
      tableIds: ids.size,
      changes: h.changes.length,
      statuses,
    },
    versions: h.versions,
    snapshots,
    tables,
    changes: h.changes,
    diagnostics: h.diagnostics,
  };
}

/** Serialise a document: two-space indentation, a final newline. */
export function serialiseDocument(doc: unknown): string {
  return JSON.stringify(doc, null, 2) + '\n';
}

/** The snapshot of one version of a document, with full tables. */
export function snapshotOfVersion(doc: InterchangeDocument, index: number): { tables: Table[]; views: ViewRef[] } | null {
  const v = doc.versions[index];
  if (!v || !v.snapshot) return null;
  const s = doc.snapshots[v.snapshot];
  if (!s) return null;
  return { tables: s.tables.map((h) => doc.tables[h]!), views: s.views };
}
