import { createHash } from 'node:crypto';
import { diffSnapshots } from '../../changes/diff-snapshots.js';
import type { Change } from '../../changes/kinds.js';
import type { History, VersionRecord } from '../../history/engine.js';
import { SnapshotStore, type BuiltSnapshot, type TableOrigins } from '../../history/snapshot-store.js';
import { toDocument, type InterchangeDocument } from '../../interchange/document.js';
import type { SnapshotInput } from '../../model/types.js';
import { GENERATOR } from '../../version.js';

/** One version given directly as a neutral snapshot (null tables: the schema is absent). */
export interface SnapshotVersion {
  /** Committer date, ISO 8601 with offset. */
  date: string;
  /** Commit id; a made-up 40-digit one from the index when absent. */
  commit?: string;
  subject?: string;
  snapshot: SnapshotInput | null;
}

/**
 * An interchange document built from neutral snapshots, with the changes between consecutive
 * versions computed as `extract` computes them. For analysing a history that did not come from
 * git (another tool's export, a hand-made fixture) and for tests of the pure measures.
 *
 * @example
 * ```ts
 * const doc = documentFromSnapshots([
 *   { date: '2024-01-01T00:00:00Z', snapshot: { tables: [members] } },
 *   { date: '2024-02-01T00:00:00Z', snapshot: { tables: [members, loans] } },
 * ]);
 * const analysis = analyzeDocument(doc);
 * ```
 */
export function documentFromSnapshots(versions: readonly SnapshotVersion[], source: { repository?: string; adapter?: string } = {}): InterchangeDocument {
  if (versions.length === 0 || !versions[0]!.snapshot) throw new Error('documentFromSnapshots: version 0 must have a snapshot');
  const store = new SnapshotStore();
  const snapshots = new Map<string, BuiltSnapshot>();
  const tableOrigins = new Map<string, TableOrigins>();
  const records: VersionRecord[] = [];
  const changes: Change[] = [];
  let last: BuiltSnapshot | null = null;
  versions.forEach((v, index) => {
    const commit = v.commit ?? createHash('sha1').update(`version ${index}`).digest('hex');
    let snap: BuiltSnapshot | null = null;
    let status: VersionRecord['status'] = 'ok';
    if (v.snapshot) {
      const made = store.fromInput(v.snapshot);
      snap = snapshots.get(made.snapshot.hash) ?? made.snapshot;
      snapshots.set(snap.hash, snap);
      made.snapshot.tables.forEach((t, i) => {
        if (!tableOrigins.has(t.hash)) tableOrigins.set(t.hash, made.origins[i] ?? {});
      });
      if (last && last.meaningHash === snap.meaningHash) status = 'no change';
      else changes.push(...diffSnapshots(index, last, snap));
      last = snap;
    } else {
      status = 'absent';
    }
    records.push({
      index,
      commit,
      parent: index === 0 ? null : records[index - 1]!.commit,
      authorTime: v.date,
      committerTime: v.date,
      subject: v.subject ?? `version ${index}`,
      files: [],
      consulted: [],
      status,
      snapshot: snap ? snap.hash : null,
      diagnostics: [],
      counters: {},
    });
  });
  const history: History = {
    repository: source.repository ?? '(snapshots)',
    ref: 'HEAD',
    head: records[records.length - 1]!.commit,
    adapter: { name: source.adapter ?? 'snapshots', version: '0' },
    paths: [],
    adapterOptions: {},
    window: {},
    versions: records,
    snapshots,
    tableOrigins,
    changes,
    diagnostics: [],
    stats: { commitsLogged: 0, commitsResumed: 0, candidates: 0, assembled: 0, assembleCacheHits: 0, filesParsed: 0, fileCacheHits: 0, blobsRead: 0, blobsReadAhead: 0, locateTextsDropped: 0, filesParsedAhead: 0 },
  };
  return toDocument(history, GENERATOR);
}
