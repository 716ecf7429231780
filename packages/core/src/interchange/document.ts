import type { Change } from '../changes/kinds.js';
import type { FileRef, History, VersionRecord } from '../history/engine.js';
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
  versions: DocumentVersion[];
  snapshots: Record<string, InterchangeSnapshot>;
  tables: Record<string, Table>;
  changes: Change[];
  diagnostics: Diagnostic[];
  analysis?: unknown;
}

/** Build the interchange document of a history. Deterministic: only the history's content decides it. */
export function toDocument(h: History, generator: { name: string; version: string }): InterchangeDocument {
  // (maps while collecting, records at the end: lookups in large records are slow)
  const snapshotMap = new Map<string, InterchangeSnapshot>();
  const tableMap = new Map<string, Table>();
  const ids = new Set<string>();
  const statuses: Record<string, number> = {};
  for (const v of h.versions) {
    statuses[v.status] = (statuses[v.status] ?? 0) + 1;
    if (!v.snapshot || snapshotMap.has(v.snapshot)) continue;
    const s = h.snapshots.get(v.snapshot)!;
    snapshotMap.set(s.hash, { meaningHash: s.meaningHash, tables: s.tables.map((t) => t.hash), views: s.views });
    for (const st of s.tables) {
      if (tableMap.has(st.hash)) continue;
      ids.add(st.table.id);
      tableMap.set(st.hash, withOrigins(st.table, h.tableOrigins.get(st.hash)));
    }
  }
  const snapshots: Record<string, InterchangeSnapshot> = Object.fromEntries(snapshotMap);
  const tables: Record<string, Table> = Object.fromEntries(tableMap);
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
    versions: versionsWithFileChanges(h.versions),
    snapshots,
    tables,
    changes: h.changes,
    diagnostics: h.diagnostics,
  };
}

/**
 * A version as the document holds it: `files` lists only the files added or changed at this
 * version (all of them at version 0), `removedFiles` the paths no longer read, `fileCount` the size
 * of the whole set, so that a history of migrations, where every version reads every earlier
 * migration, stays linear in size. `filesOfVersion` rebuilds the whole set.
 */
export type DocumentVersion = Omit<VersionRecord, 'files'> & { files: FileRef[]; removedFiles: string[]; fileCount: number };

function versionsWithFileChanges(versions: VersionRecord[]): DocumentVersion[] {
  let prev = new Map<string, string>();
  return versions.map((v) => {
    const now = new Map(v.files.map((f) => [f.path, f.blob]));
    const files = v.files.filter((f) => prev.get(f.path) !== f.blob);
    const removedFiles = [...prev.keys()].filter((p) => !now.has(p));
    prev = now;
    const { files: _all, ...rest } = v;
    return { ...rest, files, removedFiles, fileCount: v.files.length };
  });
}

/** Every file (path and blob) a version of a document was built from, sorted by path. */
export function filesOfVersion(doc: Pick<InterchangeDocument, 'versions'>, index: number): FileRef[] {
  const set = new Map<string, string>();
  for (let i = 0; i <= index && i < doc.versions.length; i++) {
    const v = doc.versions[i]!;
    for (const p of v.removedFiles ?? []) set.delete(p);
    for (const f of v.files) set.set(f.path, f.blob);
  }
  return [...set.entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)).map(([path, blob]) => ({ path, blob }));
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
