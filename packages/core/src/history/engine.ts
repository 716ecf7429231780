import { createHash } from 'node:crypto';
import { realpathSync } from 'node:fs';
import type {
  AdapterOptionValues,
  AssembleFile,
  AssembleResult,
  FileFacts,
  Located,
  SchemaAdapter,
} from '../adapter/api.js';
import type { Change } from '../changes/kinds.js';
import { diffSnapshots } from '../changes/diff-snapshots.js';
import { BlobReader } from '../git/blob-reader.js';
import { logStream, type LoggedCommit } from '../git/log-pass.js';
import { firstParentLine, openRepository, resolveRevisions } from '../git/repository.js';
import { isGlob, isRegular, logSelection, matcher, TreeState, userSelection } from '../git/tree-state.js';
import { canonicalJson } from '../model/canonical.js';
import type { Diagnostic, Table, ViewRef } from '../model/types.js';
import { UsageError, EXIT } from '../util/errors.js';
import { RecordPack } from './disk-cache.js';
import { refChanges, SetKeys, sameRefs, unpaired } from './set-key.js';
import { sortedIndex, sortedUnique } from '../util/sorted.js';
import { findNearby, type NearbyWalk } from '../util/nearby.js';
import { checkpointFile, onFirstParentLine, readCheckpoint, writeCheckpoint, type CheckpointCandidate, type WalkCheckpoint } from './walk-checkpoint.js';
import { pathLineage } from './path-lineage.js';
import { locatedRefs, NO_LOCATED, type LocatedRefs } from './located-refs.js';
import { hasPackedOrigins, packOrigins, SnapshotStore, unpackOrigins, type BuiltSnapshot, type PackedOrigins, type TableOrigins } from './snapshot-store.js';
import type { Progress } from '../util/progress.js';
import { VERSION } from '../version.js';

export type VersionStatus = 'ok' | 'no change' | 'partial' | 'carried' | 'absent';

export interface FileRef {
  path: string;
  blob: string;
}

export interface VersionRecord {
  index: number;
  commit: string;
  parent: string | null;
  authorTime: string;
  committerTime: string;
  subject: string;
  files: FileRef[];
  consulted: FileRef[];
  status: VersionStatus;
  /** Storage hash of the snapshot, null when absent. */
  snapshot: string | null;
  diagnostics: Diagnostic[];
  counters: Record<string, number>;
}

export interface ExtractRequest {
  repo: string;
  ref?: string;
  /**
   * The commit `ref` resolved to, when the caller has just opened the repository: the run reads
   * that commit (so what it extracts is what the caller keyed) and skips checking again.
   */
  resolvedHead?: string;
  since?: string;
  until?: string;
  /** `--path` entries: files, directories or globs, relative to the repository root. */
  paths?: string[];
  adapter: SchemaAdapter;
  /** How the adapter was named (package name or file), for the interchange file. */
  adapterSource?: string;
  adapterOptions?: AdapterOptionValues;
  /** Cache directory; undefined disables the disk cache. */
  cacheDir?: string;
  /** Files larger than this many bytes are not read (a diagnostic instead). */
  maxFileBytes?: number;
  /**
   * A blob reader the caller opened on this repository with the same file-size limit (it read the
   * repository's configuration file, say): the run reads through it, and the caller closes it.
   * Saves starting a second `git cat-file`.
   */
  blobReader?: BlobReader;
  progress?: Progress;
  /**
   * Whether the files of the versions ahead are parsed as soon as git hands them over (default
   * true), for an adapter with `parseFile`. False parses each file when the build reaches its
   * version: the same output (checked in test/core/parse-ahead.test.ts), for checks and
   * measurements.
   */
  parseAhead?: boolean;
}

export interface RunStats {
  commitsLogged: number;
  /** Of `commitsLogged`, those taken from the last run's walk (not logged or located again). */
  commitsResumed: number;
  candidates: number;
  assembled: number;
  assembleCacheHits: number;
  filesParsed: number;
  fileCacheHits: number;
  blobsRead: number;
  /** Blob reads the locate step asked for ahead of the commit that needs them (`TreeView.walk.readAhead`). */
  blobsReadAhead: number;
  /** Texts the locate step read (or that were read ahead for it) that were not among the files it located, dropped after it. */
  locateTextsDropped: number;
  /** Of `filesParsed`, the files parsed ahead of their version, as git handed them over (`parseAhead`). */
  filesParsedAhead: number;
}

export interface History {
  repository: string;
  ref: string;
  head: string;
  adapter: { name: string; version: string; source?: string };
  paths: string[];
  adapterOptions: Record<string, unknown>;
  window: { since?: string; until?: string };
  versions: VersionRecord[];
  snapshots: Map<string, BuiltSnapshot>;
  /** Where each stored table was declared, in the first version that had it. */
  tableOrigins: Map<string, TableOrigins>;
  changes: Change[];
  /** Run-level diagnostics (not tied to one version). */
  diagnostics: Diagnostic[];
  stats: RunStats;
}

export const DEFAULT_MAX_FILE_BYTES = 5 * 1024 * 1024;

/** Layout of the disk cache's records; bump it when they change. */
const PACK_FORMAT = 3;

/**
 * Drop from the blob reader the texts read by a locate call (path, blob) that are not among the
 * files it located (`paths`, sorted, with their references).
 */
function forgetUnlocated(reader: BlobReader, reads: ReadonlyArray<readonly [string, string]>, paths: readonly string[], refs: ReadonlyArray<FileRef | undefined>): number {
  let dropped = 0;
  for (const [p, b] of reads) {
    const at = sortedIndex(paths, p);
    if (paths[at] === p && refs[at]?.blob === b) continue;
    if (reader.forget(b)) dropped++;
  }
  return dropped;
}

/** Read-ahead of blobs: when fewer than LOW versions (or commits) ahead are asked for, ask for the next BATCH. */
const READ_AHEAD_LOW = 8;
const READ_AHEAD_BATCH = 64;

interface CachedUnit {
  k: 's';
  key: string;
  tables?: string[];
  /** The origins of `tables`: in the unit's own record in packs written before they had `o` records. */
  origins?: PackedOrigins;
  /** In memory only (never written): the origins as the adapter gave them. */
  rawOrigins?: TableOrigins[];
  views?: ViewRef[];
  /** The snapshot's storage and meaning hashes (absent in packs written before they were stored). */
  sh?: string;
  mh?: string;
  failed?: boolean;
  d: Diagnostic[];
  c?: Record<string, number>;
}
interface CachedTable {
  k: 't';
  h: string;
  /** Meaning hash (absent in packs written before it was stored). */
  m?: string;
  t: Table;
}
/**
 * The origins of a unit's tables, in a record of their own that is parsed only when needed: a
 * run needs them only for the versions where a table first appears.
 */
interface CachedOrigins {
  k: 'o';
  key: string;
  origins: PackedOrigins;
}
/** The changes from one snapshot to the next (by their storage hashes), without the version index. */
interface CachedChanges {
  k: 'c';
  key: string;
  ch: Array<Omit<Change, 'version'>>;
}
interface CachedFacts {
  k: 'f';
  b: string;
  r: FileFacts<unknown>;
}
type CacheRecord = CachedUnit | CachedTable | CachedFacts | CachedOrigins | CachedChanges;

/** The options that change an adapter's output, in a stable form: part of every cache key. */
export function outputOptions(adapter: SchemaAdapter, values: AdapterOptionValues): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const o of adapter.options ?? []) {
    if (o.affectsOutput === false) continue;
    const v = values[o.flag];
    if (v !== undefined) out[o.flag] = v;
  }
  return out;
}

function normaliseUserPath(p: string): string {
  return p.replace(/\\/g, '/').replace(/^\.\/+/, '').replace(/\/+$/, '');
}

/** Candidate version found by the locate pass. */
interface Candidate {
  pos: number;
  commit: LoggedCommit;
  files: FileRef[];
  consulted: FileRef[];
  diagnostics: Diagnostic[];
}

/**
 * Rebuild the schema history of a repository: one log pass, one blob reader, the adapter's
 * locate step at every commit that touches a watched path, then a parse of every distinct
 * input set (cached), and the changes between consecutive versions.
 */
export async function extractHistory(req: ExtractRequest): Promise<History> {
  const { adapter } = req;
  const options = req.adapterOptions ?? {};
  const ref = req.ref ?? 'HEAD';
  const repo = req.resolvedHead ? { path: req.repo, head: req.resolvedHead, ref } : await openRepository(req.repo, ref);
  const progress = req.progress;
  const maxBytes = req.maxFileBytes ?? DEFAULT_MAX_FILE_BYTES;

  // ---- what to watch
  const userPaths = (req.paths ?? []).map(normaliseUserPath).filter(Boolean);
  const literal = userPaths.filter((p) => !isGlob(p));
  const globs = userPaths.filter((p) => isGlob(p));
  const watch = [...adapter.watch];
  for (const p of literal) watch.push(p, `${p}/**`);
  watch.push(...globs);
  const selection = logSelection(watch, literal.length > 0);

  // the disk cache is read, and its records parsed, while git works on the log pass
  const namespace = packNamespace(adapter, options);
  const pack = req.cacheDir ? RecordPack.open<CacheRecord>(req.cacheDir, namespace, ['o']) : null;
  // (a run that stops before it builds versions must not leave the read unhandled)
  pack?.catch(() => undefined);

  // ---- the walk of the last run over this repository and selection, when its head is still on
  // the first-parent line: only the commits after it are logged and located. (Not when literal
  // --path entries are followed back through renames: a rename after the last run's head would
  // change which paths its commits hold.)
  const walkKey = canonicalJson({ repo: realpathSync(repo.path), watch, maxBytes });
  const walkFile = req.cacheDir && literal.length === 0 ? checkpointFile(req.cacheDir, namespace, hashText(walkKey).slice(0, 16)) : null;
  let resumed = walkFile ? await readCheckpoint(walkFile, walkKey) : undefined;
  if (resumed && !(await onFirstParentLine(repo.path, resumed.head, repo.head))) resumed = undefined;

  // ---- the log pass, located as git writes it (git diffs the later commits while this process
  // locates the schema in the earlier ones); the window's bounds are checked meanwhile
  const stream = resumed?.head === repo.head ? null : logStream(repo.path, resumed ? `${resumed.head}..${repo.head}` : repo.head, selection.pathspecs, undefined, {
    renames: literal.length > 0,
    ...(selection.keep ? { keep: selection.keep } : {}),
  });
  const commits: LoggedCommit[] = resumed ? [...resumed.commits] : [];
  /** Waits for more of the log; false once all of it is in `commits`. */
  const moreLog = async (): Promise<boolean> => {
    if (!stream) return false;
    const more = await stream.more();
    for (let k = commits.length - (resumed ? resumed.commits.length : 0); k < stream.commits.length; k++) commits.push(stream.commits[k]!);
    return more;
  };
  const windowOf = await resolveWindow(repo.path, repo.head, req.since, req.until);

  // ---- the locate pass
  const reader = req.blobReader ?? new BlobReader(repo.path, maxBytes);
  try {
    const tree = new TreeState();
    // following literal paths back through renames needs the whole log first
    if (literal.length > 0) while (await moreLog());
    const lineage = literal.length > 0 ? pathLineage(commits, literal) : null;
    const userMatch = matcher(globs);
    const candidates: Candidate[] = [];
    let prevFiles: FileRef[] = [];
    /** The last commit's located paths and their references. */
    let prevLocated: LocatedRefs = NO_LOCATED;
    const keys = new SetKeys();
    const ambiguous = new Map<string, string[]>();
    let ambiguousHint = '';
    let unsupported: string | undefined;
    let searched: string | undefined;
    progress?.phase('reading history and locating the schema');
    const walkId = {};
    // read-ahead for the locate step (see TreeView.walk): commits before `aheadTo` were scanned
    let aheadTo = 0;
    let readAheads = 0;
    let locateTextsDropped = 0;
    /** The blobs read ahead for each commit (by index), until that commit is located. */
    const aheadFor = new Map<number, Array<[string, string]>>();
    const readAheadFrom = (from: number) => (wanted: (path: string) => boolean): void => {
      if (aheadTo >= from + READ_AHEAD_LOW) return;
      const end = Math.min(commits.length, from + READ_AHEAD_BATCH);
      for (let k = Math.max(aheadTo, from); k < end; k++) {
        for (const ch of commits[k]!.changes) {
          if (ch.status !== 'D' && isRegular(ch.newMode) && wanted(ch.path)) {
            readAheads++;
            void reader.read(ch.newBlob).catch(() => undefined);
            let list = aheadFor.get(k);
            if (!list) aheadFor.set(k, (list = []));
            list.push([ch.path, ch.newBlob]);
          }
        }
      }
      aheadTo = Math.max(aheadTo, end);
    };
    if (resumed) {
      ({ prevFiles, prevLocated, ambiguousHint, unsupported, searched } = restoreWalk(resumed, tree, keys, commits, candidates, ambiguous));
    }
    for (let i = resumed ? resumed.commits.length : 0; ; i++) {
      while (i >= commits.length && (await moreLog()));
      if (i >= commits.length) break;
      const c = commits[i]!;
      tree.apply(c.changes);
      const changed: string[] = [];
      for (const ch of c.changes) {
        changed.push(ch.path);
        if (ch.from !== ch.path) changed.push(ch.from);
      }
      const reads: Array<[string, string]> = [];
      const view = tree.view(c.commit, reader, { id: walkId, changed, readAhead: readAheadFrom(i + 1) }, reads);
      let located: Located;
      if (userPaths.length > 0) {
        const names = lineage ? lineage[i]! : [];
        located = await adapter.locate(view, { ...userSelection(view, userMatch, names), options });
      } else {
        located = await adapter.locate(view, { options });
      }
      if (located.searched) searched = located.searched;
      if (located.unsupported) unsupported = located.unsupported;
      if (located.ambiguous) {
        for (const cand of located.ambiguous.candidates) ambiguous.set(cand.join(', '), cand);
        ambiguousHint = located.ambiguous.hint;
      }
      // the file references of the located paths; a path the last commit also located, and that
      // this commit did not change, keeps its reference (no lookups)
      const now = locatedRefs(located.files, prevLocated, changed, (p) => {
        const blob = tree.get(p);
        return blob ? keys.ref(p, blob) : undefined;
      });
      const { paths, refs, files } = now;
      prevLocated = now;
      // texts the locate step read only to decide (configs, files it scanned and left out), or that
      // were read ahead for this commit and not located, are not kept for the rest of the walk:
      // adapters keep what they derive from them per blob
      const ahead = aheadFor.get(i);
      if (ahead) {
        aheadFor.delete(i);
        for (const b of ahead) reads.push(b);
      }
      if (reads.length > 0) locateTextsDropped += forgetUnlocated(reader, reads, paths, refs);
      if (!sameRefs(files, prevFiles)) {
        const consulted: FileRef[] = [];
        for (const p of sortedUnique(located.consulted ?? [])) {
          const blob = tree.get(p);
          if (blob) consulted.push({ path: p, blob });
        }
        candidates.push({ pos: i, commit: c, files, consulted, diagnostics: located.diagnostics ?? [] });
        prevFiles = files;
      }
      if (i % 256 === 0) progress?.tick(i + 1);
    }
    progress?.tick(commits.length);
    if (walkFile && !(resumed?.head === repo.head)) {
      writeCheckpoint(walkFile, {
        key: walkKey, head: repo.head, commits, tree: tree.entries(), candidates: checkpointCandidates(candidates),
        lastPaths: [...prevLocated.paths], ambiguous: [...ambiguous.values()], ambiguousHint,
        ...(unsupported !== undefined ? { unsupported } : {}), ...(searched !== undefined ? { searched } : {}),
      });
    }

    if (ambiguous.size > 0) {
      const list = [...ambiguous.values()].map((c) => c.join(' + ')).join('; ');
      // suggest a candidate that still exists at the head, rather than one that later vanished
      const head = tree.view(repo.head, reader);
      const present = (p: string): boolean => head.has(p.replace(/\/+$/, '')) || head.under(p.replace(/\/+$/, '')).length > 0;
      const atHead = [...ambiguous.values()].find((c) => c.every(present));
      const hint = atHead ? `--path ${atHead.join(' --path ')}` : ambiguousHint || '--path';
      throw new UsageError(`several independent schemas found (${list}); choose one with ${hint}`, EXIT.failure);
    }
    if (unsupported) {
      throw new UsageError(unsupported, EXIT.failure);
    }
    const anyFound = candidates.some((c) => c.files.length > 0);
    if (!anyFound && !searched) {
      // no commit touched a watched path: ask the adapter what it would have searched
      const none = await adapter.locate(new TreeState().view(repo.head, reader), { options });
      searched = none.searched ?? adapter.watch.join(', ');
    }
    if (!anyFound) {
      throw new UsageError(
        `no ${adapter.name} schema found in the history of ${ref}${searched ? `; searched ${searched}` : ''}` +
          (userPaths.length > 0 ? ` (--path ${userPaths.join(' ')})` : ''),
        EXIT.failure,
      );
    }

    // ---- cut to the window; leading absences are not versions
    const window = windowOf(commits);
    let inWindow = candidates.filter((c) => c.pos >= window.from && c.pos <= window.to);
    const firstPresent = inWindow.findIndex((c) => c.files.length > 0);
    inWindow = firstPresent < 0 ? [] : inWindow.slice(firstPresent);
    if (inWindow.length === 0) {
      throw new UsageError(`no version of the ${adapter.name} schema falls in the window given by --since/--until`, EXIT.failure);
    }

    // ---- build every version
    const built = await buildVersions(inWindow, {
      adapter, options, reader, pack: pack ? await pack : null, progress, keys, parseAhead: req.parseAhead !== false,
    });
    if (built.versions.length === 0) throw new UsageError(`no version of the ${adapter.name} schema could be built: ${built.runDiagnostics.find((d) => d.severity === 'error')?.message ?? 'every one failed'}`, EXIT.failure);
    return {
      repository: req.repo,
      ref,
      head: repo.head,
      adapter: { name: adapter.name, version: adapter.version, ...(req.adapterSource ? { source: req.adapterSource } : {}) },
      paths: userPaths,
      adapterOptions: outputOptions(adapter, options),
      window: { ...(req.since ? { since: req.since } : {}), ...(req.until ? { until: req.until } : {}) },
      versions: built.versions,
      snapshots: built.snapshots,
      tableOrigins: built.tableOrigins,
      changes: built.changes,
      diagnostics: built.runDiagnostics,
      stats: { ...built.stats, commitsLogged: commits.length, commitsResumed: resumed?.commits.length ?? 0, candidates: candidates.length, blobsRead: reader.blobsRead, blobsReadAhead: readAheads, locateTextsDropped },
    };
  } finally {
    if (!req.blobReader) reader.close();
  }
}

/** The candidates as a checkpoint keeps them: each one's files as changes from the one before. */
function checkpointCandidates(candidates: readonly Candidate[]): CheckpointCandidate[] {
  let prev: readonly FileRef[] = [];
  return candidates.map((c) => {
    const { removed, added } = refChanges(prev, c.files);
    prev = c.files;
    return {
      pos: c.pos,
      add: added.map((f) => [f.path, f.blob] as [string, string]),
      del: removed,
      consulted: c.consulted.map((f) => [f.path, f.blob] as [string, string]),
      diagnostics: c.diagnostics,
    };
  });
}

/** Put the walk state of a checkpoint back: the tree, the candidates and what the locate loop carries. */
function restoreWalk(
  cp: WalkCheckpoint,
  tree: TreeState,
  keys: SetKeys,
  commits: readonly LoggedCommit[],
  candidates: Candidate[],
  ambiguous: Map<string, string[]>,
): { prevFiles: FileRef[]; prevLocated: LocatedRefs; ambiguousHint: string; unsupported?: string; searched?: string } {
  tree.seed(cp.tree);
  let cur: FileRef[] = [];
  for (const c of cp.candidates) {
    // merge the previous files (sorted by path) with the added ones (sorted too), leaving out the removed
    const removed = new Set(c.del);
    const next: FileRef[] = [];
    let i = 0;
    let j = 0;
    while (i < cur.length || j < c.add.length) {
      const a = c.add[j];
      if (a === undefined || (i < cur.length && cur[i]!.path < a[0])) {
        if (!removed.has(cur[i]!.path)) next.push(cur[i]!);
        i++;
      } else {
        if (i < cur.length && cur[i]!.path === a[0]) i++;
        next.push(keys.ref(a[0], a[1]));
        j++;
      }
    }
    cur = next;
    candidates.push({
      pos: c.pos, commit: commits[c.pos]!, files: cur,
      consulted: c.consulted.map(([path, blob]) => ({ path, blob })), diagnostics: c.diagnostics,
    });
  }
  for (const a of cp.ambiguous) ambiguous.set(a.join(', '), a);
  const refs = cp.lastPaths.map((p) => {
    const blob = tree.get(p);
    return blob ? keys.ref(p, blob) : undefined;
  });
  return {
    prevFiles: cur, prevLocated: { paths: cp.lastPaths, refs }, ambiguousHint: cp.ambiguousHint,
    ...(cp.unsupported !== undefined ? { unsupported: cp.unsupported } : {}), ...(cp.searched !== undefined ? { searched: cp.searched } : {}),
  };
}

/**
 * The --since/--until window: its bounds are resolved and checked at once (a wrong one is a usage
 * error before any other work), and the function returned gives the positions in the log of the
 * first and last commit inside it.
 */
async function resolveWindow(
  repo: string,
  head: string,
  since?: string,
  until?: string,
): Promise<(commits: readonly LoggedCommit[]) => { from: number; to: number }> {
  if (!since && !until) return (commits) => ({ from: 0, to: commits.length - 1 });
  const bounds = [since, until].filter((x): x is string => !!x);
  const revs = await resolveRevisions(repo, bounds);
  let line: Map<string, number> | null = null;
  const posOnLine = async (id: string, label: string): Promise<number> => {
    if (!line) line = new Map((await firstParentLine(repo, head)).map((c, i) => [c, i]));
    const p = line.get(id);
    if (p === undefined) throw new UsageError(`${label} is not on the first-parent line of the analysed ref`, EXIT.usage);
    return p;
  };
  const asDate = (v: string, flag: string): number => {
    const t = Date.parse(v);
    if (Number.isNaN(t)) throw new UsageError(`${flag} ${v}: neither a revision nor a date (use YYYY-MM-DD or a commit, tag or branch)`, EXIT.usage);
    return t;
  };
  /** A bound: a position on the first-parent line, or a time. */
  const bound = async (v: string, flag: string, wholeDay: boolean): Promise<{ pos: number } | { time: number }> => {
    const id = revs.get(v);
    if (id) return { pos: await posOnLine(id, `${flag} ${v}`) };
    // a bare date as --until means the whole of that day
    return { time: asDate(v, flag) + (wholeDay && /^\d{4}-\d{2}-\d{2}$/.test(v) ? 86_400_000 - 1 : 0) };
  };
  const lo = since ? await bound(since, '--since', false) : null;
  const hi = until ? await bound(until, '--until', true) : null;
  const onLine = line as Map<string, number> | null;
  return (commits) => {
    let positions: number[] | null = null;
    const logPos = (): number[] => (positions ??= commits.map((c) => onLine!.get(c.commit) ?? -1));
    let from = 0;
    let to = commits.length - 1;
    if (lo) {
      from = 'pos' in lo ? logPos().findIndex((x) => x >= lo.pos) : commits.findIndex((c) => Date.parse(c.committerTime) >= lo.time);
      if (from < 0) from = commits.length;
    }
    if (hi) {
      to = -1;
      if ('pos' in hi) {
        logPos().forEach((x, i) => {
          if (x >= 0 && x <= hi.pos) to = i;
        });
      } else {
        commits.forEach((c, i) => {
          if (Date.parse(c.committerTime) <= hi.time) to = i;
        });
      }
    }
    return { from, to };
  };
}

interface BuildContext {
  keys: SetKeys;
  adapter: SchemaAdapter;
  options: AdapterOptionValues;
  reader: BlobReader;
  /** The disk cache, when there is one. */
  pack: RecordPack<CacheRecord> | null;
  progress?: Progress;
  /** See `ExtractRequest.parseAhead`. */
  parseAhead: boolean;
}

/** The disk cache's namespace of an adapter and its options. */
function packNamespace(adapter: SchemaAdapter, options: AdapterOptionValues): string {
  const optionsKey = canonicalJson(outputOptions(adapter, options));
  // core's own version and pack format are in the key too: what core stores (meaning hashes,
  // say) is only valid for the core that computed it
  return `${safeName(adapter.name)}-${safeName(adapter.version)}-${hashText(`${PACK_FORMAT}|${VERSION}|${optionsKey}`).slice(0, 12)}`;
}

async function buildVersions(candidates: Candidate[], ctx: BuildContext) {
  const { adapter, options, reader, pack } = ctx;

  const store = new SnapshotStore();
  const unitCache = new Map<string, CachedUnit>();
  const factsCache = new Map<string, FileFacts<unknown>>();
  const cachedTables = new Map<string, Table>();
  const cachedMeanings = new Map<string, string>();
  const cachedChanges = new Map<string, Array<Omit<Change, 'version'>>>();
  if (pack) {
    for (const r of pack.loaded) {
      if (r.k === 's') unitCache.set(r.key, r);
      else if (r.k === 'c') cachedChanges.set(r.key, r.ch);
      else if (r.k === 't') {
        cachedTables.set(r.h, r.t);
        if (r.m) cachedMeanings.set(r.h, r.m);
      }
      else if (r.k === 'f') factsCache.set(r.b, r.r);
    }
  }
  const session = adapter.createSession?.(options);
  const assemble = (input: Parameters<SchemaAdapter['assemble']>[0]): AssembleResult | Promise<AssembleResult> =>
    session ? session.assemble(input) : adapter.assemble(input, options);

  const unitTablesKnown = (u: CachedUnit): boolean =>
    !u.tables || u.tables.every((h) => store.getTable(h) !== undefined || cachedTables.has(h));
  /** The unit's packed origins from the disk cache, when one of its tables still needs its first origins. */
  const loadOrigins = (u: CachedUnit): void => {
    if (u.rawOrigins || u.origins || !pack || !u.tables?.some((h) => !tableOrigins.has(h))) return;
    const rec = pack.deferredRecord(u.key);
    if (rec?.k === 'o') u.origins = rec.origins;
  };
  /**
   * Whether a cached unit can stand for this version: its tables are known, and the cache kept
   * the origins of every table that first appears here in this run (a run that starts later in
   * the history, with --since, can need some that an earlier run did not keep: then the unit is
   * assembled again).
   */
  const usable = (u: CachedUnit): boolean => {
    if (!unitTablesKnown(u)) return false;
    loadOrigins(u);
    const packed = u.origins;
    return !packed || u.tables!.every((h, i) => tableOrigins.has(h) || hasPackedOrigins(packed, i));
  };
  /** The cached unit of an input set, when it can stand for this version. */
  const usableUnit = (key: string): CachedUnit | undefined => {
    const u = unitCache.get(key);
    return u && usable(u) ? u : undefined;
  };

  const stats = { assembled: 0, assembleCacheHits: 0, filesParsed: 0, fileCacheHits: 0, filesParsedAhead: 0 };
  const lastGood = new Map<string, { blob: string; facts: unknown }>();
  const fileInputs = new FileInputs(adapter, options, reader, factsCache, lastGood, pack, stats);
  const versions: VersionRecord[] = [];
  const snapshots = new Map<string, BuiltSnapshot>();
  const tableOrigins = new Map<string, TableOrigins>();
  const changes: Change[] = [];
  const runDiagnostics: Diagnostic[] = [];
  let lastPresent: BuiltSnapshot | null = null;

  // Ask the blob reader for the files of the versions ahead of time, so that git reads them while
  // this process parses (only files that no cache covers).
  const unitKeys = new Map<Candidate, string>();
  const unitKeyOf = (cand: Candidate): string => {
    let k = unitKeys.get(cand);
    if (k === undefined) {
      k = ctx.keys.key(cand.files);
      unitKeys.set(cand, k);
    }
    return k;
  };
  let prefetched = 0;
  let prefetchedFiles: readonly FileRef[] = [];
  const prefetch = (upTo: number): void => {
    for (; prefetched < Math.min(upTo, candidates.length); prefetched++) {
      const cand = candidates[prefetched]!;
      const files = cand.files;
      if (files.length === 0) continue;
      if (!adapter.parseFile) {
        const hit = unitCache.get(unitKeyOf(cand));
        if (hit && unitTablesKnown(hit)) continue;
        for (const f of files) void reader.read(f.blob).catch(() => undefined);
      } else {
        // only files that the candidate before did not have can be new to the caches; each is
        // parsed as soon as git hands it over (see `FileInputs.readAhead`)
        for (const f of unpaired(prefetchedFiles, files)) {
          if (factsCache.has(f.blob)) continue;
          if (ctx.parseAhead) fileInputs.readAhead(f);
          else void reader.read(f.blob).catch(() => undefined);
        }
        prefetchedFiles = files;
      }
    }
  };

  /**
   * The pairs of consecutive snapshots to diff, diffed after the loop: in one run rather than
   * between the assembly of one version and the next (process CPU 3–4% less on the benchmarks'
   * extracts, five interleaved runs each); the changes are the same, in version order.
   */
  const deferred: Array<{ index: number; before: BuiltSnapshot | null; after: BuiltSnapshot }> = [];
  /** Push the changes between two consecutive snapshots, the version's index on each. */
  const diffInto = (index: number, before: BuiltSnapshot | null, after: BuiltSnapshot): void => {
    // the changes between two snapshots are the same wherever they meet: cached by their hashes
    const ckey = `${before?.hash ?? ''}>${after.hash}`;
    const known = cachedChanges.get(ckey);
    if (known) {
      for (const ch of known) changes.push({ version: index, ...ch });
    } else {
      const made = diffSnapshots(index, before, after);
      changes.push(...made);
      const ch = made.map(({ version: _v, ...rest }) => rest);
      cachedChanges.set(ckey, ch);
      pack?.add({ k: 'c', key: ckey, ch });
    }
  };
  ctx.progress?.phase('rebuilding versions', candidates.length);
  for (let vi = 0; vi < candidates.length; vi++) {
    // in batches: each batch is one write to git and comes back in few reads (a write per
    // version woke git once or twice per version, which cost more than git's own work)
    if (prefetched < vi + READ_AHEAD_LOW) prefetch(vi + READ_AHEAD_BATCH);
    const cand = candidates[vi]!;
    const c = cand.commit;
    const diagnostics: Diagnostic[] = [...cand.diagnostics];
    let status: VersionStatus = 'ok';
    let snapshot: BuiltSnapshot | null = null;
    let counters: Record<string, number> = {};

    if (cand.files.length === 0) {
      status = 'absent';
      diagnostics.push({ severity: 'warning', code: 'schema/absent', message: 'the schema is not in the tree at this commit' });
    } else {
      // ---- read and (per file) parse; a blob is read only when nothing cached covers it
      const inputs: AssembleFile<unknown>[] = [];
      const missing: string[] = [];
      /** Unreadable files of an adapter without parseFile: kept with the cached unit. */
      const readDiagnostics: Diagnostic[] = [];
      let stale = false;
      let key: string;
      /** The facts of the files the locate step consulted, for an adapter with `readsConsulted`. */
      let consulted: AssembleFile<unknown>[] | undefined;
      /** The cached unit that stands for this version, once looked up (null: not yet). */
      let cached: CachedUnit | undefined | null = null;
      if (!adapter.parseFile) {
        key = unitKeyOf(cand);
        cached = usableUnit(key);
        if (!cached) {
          for (const f of cand.files) {
            const got = await reader.read(f.blob);
            if (got.kind === 'text') {
              inputs.push({ path: f.path, blob: f.blob, text: got.text });
              reader.forget(f.blob);
            } else {
              readDiagnostics.push(readDiagnostic(f.path, got));
              missing.push(f.path);
            }
          }
        }
      } else {
        const { plain, stale: anyStale } = await fileInputs.gather(cand.files, diagnostics, inputs, missing);
        stale = anyStale;
        // the set of inputs: plain (path, blob) pairs, plus the stale ones with the blob whose facts they use
        const extra: string[] = [];
        if (adapter.readsConsulted) {
          consulted = await fileInputs.consulted(cand.consulted);
          for (const f of cand.consulted) extra.push(`consulted\u0000${f.path}\u0000${f.blob}`);
        }
        // (inputs marked stale are made only where `stale` is set)
        if (stale) for (const x of inputs) if (x.stale) extra.push(`stale\u0000${x.path}\u0000${x.blob}\u0000${lastGood.get(x.path)?.blob ?? ''}`);
        for (const m of missing) extra.push(`missing\u0000${m}`);
        key = ctx.keys.key(plain, extra);
      }

      // ---- assemble (cached by the exact input set)
      let unit = cached === null ? usableUnit(key) : cached;
      /** The snapshot the store built just now for this unit, if it did. */
      let built: BuiltSnapshot | null = null;
      if (unit) {
        stats.assembleCacheHits++;
      } else {
        const result =
          !adapter.parseFile && missing.length > 0
            ? ({ failed: true, diagnostics: [] } as AssembleResult)
            : await assemble({ files: inputs, missing, ...(consulted ? { consulted } : {}) });
        stats.assembled++;
        if ('failed' in result) {
          unit = { k: 's', key, failed: true, d: [...readDiagnostics, ...result.diagnostics] };
        } else {
          const made = store.fromInput(result.snapshot);
          built = made.snapshot;
          for (const st of made.newTables) {
            if (!cachedTables.has(st.hash)) {
              cachedTables.set(st.hash, st.table);
              pack?.add({ k: 't', h: st.hash, m: st.meaningHash, t: st.table });
            }
          }
          unit = {
            k: 's', key,
            tables: made.snapshot.tables.map((t) => t.hash),
            rawOrigins: made.origins,
            views: made.snapshot.views,
            sh: made.snapshot.hash,
            mh: made.snapshot.meaningHash,
            d: [...readDiagnostics, ...result.diagnostics],
            ...(result.counters && Object.keys(result.counters).length > 0 ? { c: result.counters } : {}),
          };
        }
        unitCache.set(key, unit);
        if (pack) {
          const { rawOrigins, origins: _packed, ...stored } = unit;
          pack.add(stored);
          // packed only for the disk cache (this run reads them unpacked), and only those of the
          // tables that first appear here: a run over the same history needs no others
          if (rawOrigins) pack.add({ k: 'o', key, origins: packOrigins(rawOrigins, unit.tables!.map((h) => !tableOrigins.has(h))) });
        }
      }
      diagnostics.push(...unit.d);
      counters = unit.c ?? {};
      if (unit.failed) {
        if (lastPresent) {
          status = 'carried';
          snapshot = lastPresent;
          diagnostics.push({ severity: 'warning', code: 'schema/carried', message: 'the schema could not be built; the previous snapshot is kept' });
        } else {
          // nothing to carry yet: this commit is not a version (version 0 is the first that builds)
          runDiagnostics.push(
            ...diagnostics.map((d) => ({ ...d, message: `${c.commit.slice(0, 10)} (before version 0): ${d.message}` })),
          );
          continue;
        }
      } else {
        // a snapshot seen before in this run is taken as it is; else built from its stored tables
        // (its hashes as the cache kept them, when it did)
        snapshot = (unit.sh !== undefined ? snapshots.get(unit.sh) : undefined) ?? built;
        if (!snapshot) {
          const tables = unit.tables!.map((h) => store.getTable(h) ?? store.internKnown(h, cachedTables.get(h)!, cachedMeanings.get(h)));
          snapshot = unit.sh !== undefined && unit.mh !== undefined
            ? { hash: unit.sh, meaningHash: unit.mh, tables, views: unit.views ?? [] }
            : store.assembleSnapshot(tables, unit.views ?? []);
          snapshot = snapshots.get(snapshot.hash) ?? snapshot;
        }
        loadOrigins(unit);
        unit.tables!.forEach((h, i) => {
          if (!tableOrigins.has(h)) {
            tableOrigins.set(h, unit!.rawOrigins ? unit!.rawOrigins[i] ?? {} : unit!.origins ? unpackOrigins(unit!.origins, i) : {});
          }
        });
        // every table of this unit now has its first origins; the unit's copy is not needed again
        delete unit.origins;
        delete unit.rawOrigins;
        if (stale) status = 'partial';
        else if (lastPresent && lastPresent.meaningHash === snapshot.meaningHash) status = 'no change';
      }
    }

    const index = versions.length;
    if (snapshot) {
      snapshots.set(snapshot.hash, snapshot);
      if (status !== 'carried' && (lastPresent === null || lastPresent !== snapshot)) {
        if (lastPresent === null || lastPresent.meaningHash !== snapshot.meaningHash) {
          deferred.push({ index, before: lastPresent, after: snapshot });
        }
      }
      lastPresent = snapshot;
    }
    versions.push({
      index,
      commit: c.commit,
      parent: c.parent,
      authorTime: c.authorTime,
      committerTime: c.committerTime,
      subject: c.subject,
      files: cand.files,
      consulted: cand.consulted,
      status,
      snapshot: snapshot ? snapshot.hash : null,
      diagnostics: dedupeDiagnostics(diagnostics),
      counters,
    });
    ctx.progress?.tick(vi + 1);
  }
  for (const d of deferred) diffInto(d.index, d.before, d.after);
  pack?.flush();
  return { versions, snapshots, tableOrigins, changes, runDiagnostics, stats };
}

/** A file that parsed: the input handed to the adapter (the same object in every version) and the file's diagnostics. */
interface KnownInput {
  input: AssembleFile<unknown>;
  diagnostics: Diagnostic[];
}

/**
 * The inputs of one version's files for an adapter that parses file by file: a file seen in an
 * earlier version gets its input object back (found at its place in the last version's list, or
 * by its FileRef), a blob parsed before gets its cached facts, any other is read and parsed. A
 * file that fails keeps its last good facts (stale) or is missing. Its own function, called once
 * per version, so that V8 optimises this loop on its own rather than with the whole build.
 */
class FileInputs {
  /**
   * A file that parsed, by its FileRef (one object while its path keeps that blob): the input
   * handed to the adapter, the same object in every version, and the file's diagnostics.
   */
  private readonly inputOf = new WeakMap<FileRef, KnownInput>();
  /** The last version's files and, at the same positions, their known inputs (see `findNearby`). */
  private lastFiles: readonly FileRef[] = [];
  private lastKnown: Array<KnownInput | undefined> = [];
  /** Facts of blobs read ahead, parsed as soon as their text came (see `readAhead`). */
  private readonly ahead = new Map<string, Promise<FileFacts<unknown> | undefined>>();

  constructor(
    private readonly adapter: SchemaAdapter,
    private readonly options: AdapterOptionValues,
    private readonly reader: BlobReader,
    private readonly factsCache: Map<string, FileFacts<unknown>>,
    private readonly lastGood: Map<string, { blob: string; facts: unknown }>,
    private readonly pack: RecordPack<CacheRecord> | null,
    private readonly stats: { filesParsed: number; fileCacheHits: number; filesParsedAhead: number },
  ) {}

  /**
   * Push the inputs of `files` (in their order) to `inputs`, their diagnostics to `diagnostics`
   * and the paths that have no facts to `missing`. Returns the files whose inputs are plain
   * (parsed, not stale) and whether any input is stale.
   */
  async gather(files: readonly FileRef[], diagnostics: Diagnostic[], inputs: AssembleFile<unknown>[], missing: string[]): Promise<{ plain: FileRef[]; stale: boolean }> {
    const { lastFiles, lastKnown, inputOf, stats } = this;
    const plain: FileRef[] = [];
    let stale = false;
    const knownNow: Array<KnownInput | undefined> = new Array(files.length);
    const at: NearbyWalk = { j: 0 };
    for (let k = 0; k < files.length; k++) {
      const f = files[k]!;
      // the same file as in an earlier version: its input object is reused
      const near = findNearby(lastFiles, at, f);
      const known = (near >= 0 ? lastKnown[near] : undefined) ?? inputOf.get(f);
      knownNow[k] = known;
      if (known) {
        stats.fileCacheHits++;
        const ds = known.diagnostics;
        for (let q = 0; q < ds.length; q++) diagnostics.push(ds[q]!);
        inputs.push(known.input);
        plain.push(f);
        continue;
      }
      const result = await this.facts(f, diagnostics);
      const fileDiagnostics = (result?.diagnostics ?? []).map((d) => ({ ...d, file: d.file ?? f.path }));
      diagnostics.push(...fileDiagnostics);
      if (result && result.ok) {
        this.lastGood.set(f.path, { blob: f.blob, facts: result.facts });
        const input = { path: f.path, blob: f.blob, facts: result.facts };
        knownNow[k] = { input, diagnostics: fileDiagnostics };
        inputOf.set(f, knownNow[k]!);
        inputs.push(input);
        plain.push(f);
        continue;
      }
      stale = true;
      const lg = this.lastGood.get(f.path);
      if (lg) {
        inputs.push({ path: f.path, blob: f.blob, facts: lg.facts, stale: true });
        diagnostics.push({
          severity: 'warning', code: 'file/kept-last-good', file: f.path,
          message: `${f.path} failed to parse; its last good parse (blob ${lg.blob.slice(0, 10)}) is kept`,
        });
      } else {
        missing.push(f.path);
        diagnostics.push({
          severity: 'warning', code: 'file/skipped', file: f.path,
          message: `${f.path} failed to parse and never parsed before; its effects are left out`,
        });
      }
    }
    this.lastFiles = files;
    this.lastKnown = knownNow;
    return { plain, stale };
  }

  /**
   * Ask git for a file that a version ahead will need, and parse it as soon as its text comes,
   * while the build works on the versions before (facts depend on the text alone). Parsing
   * there, in runs as git answers, rather than file by file between the build's other steps
   * made the benchmarks' extracts faster (DEVELOPERS.md, Performance).
   * A file that cannot be read, or whose parse throws, is left to `facts`, which reads and
   * parses it again in its turn and reports it as before.
   */
  readAhead(f: FileRef): void {
    if (this.ahead.has(f.blob)) return;
    const read = this.reader.read(f.blob);
    this.ahead.set(
      f.blob,
      read.then(
        async (got) => (got.kind === 'text' ? await this.adapter.parseFile!({ path: f.path, blob: f.blob, text: got.text }, this.options) : undefined),
        () => undefined,
      ).catch(() => undefined),
    );
  }

  /**
   * The facts of the files a locate step consulted (for an adapter with `readsConsulted`): parsed
   * and cached by blob as the inputs are; those that cannot be read or parsed are left out, and
   * their diagnostics too (a consulted file is not part of the schema).
   */
  async consulted(files: readonly FileRef[]): Promise<AssembleFile<unknown>[]> {
    const out: AssembleFile<unknown>[] = [];
    const ignored: Diagnostic[] = [];
    for (const f of files) {
      const r = await this.facts(f, ignored);
      if (r && r.ok) out.push({ path: f.path, blob: f.blob, facts: r.facts });
    }
    return out;
  }

  /** A file's facts: cached by blob, else parsed ahead or read and parsed now (undefined when it cannot be read). */
  private async facts(f: FileRef, diagnostics: Diagnostic[]): Promise<FileFacts<unknown> | undefined> {
    let result = this.factsCache.get(f.blob);
    if (result) {
      this.stats.fileCacheHits++;
      return result;
    }
    const early = this.ahead.get(f.blob);
    if (early) {
      this.ahead.delete(f.blob);
      result = await early;
      if (result) this.stats.filesParsedAhead++;
    }
    if (!result) {
      const got = await this.reader.read(f.blob);
      if (got.kind !== 'text') {
        diagnostics.push(readDiagnostic(f.path, got));
        return undefined;
      }
      result = await this.adapter.parseFile!({ path: f.path, blob: f.blob, text: got.text }, this.options);
    }
    this.stats.filesParsed++;
    this.factsCache.set(f.blob, result);
    this.pack?.add({ k: 'f', b: f.blob, r: result });
    this.reader.forget(f.blob);
    return result;
  }
}

function readDiagnostic(path: string, got: { kind: string; size?: number }): Diagnostic {
  switch (got.kind) {
    case 'too-large':
      return {
        severity: 'error', code: 'file/too-large', file: path,
        message: `${path} has ${got.size} bytes, over the size limit (--max-file-size); not read`,
      };
    case 'binary':
      return { severity: 'error', code: 'file/binary', file: path, message: `${path} is a binary file; not read` };
    default:
      return { severity: 'error', code: 'file/missing', file: path, message: `${path}: blob missing from the repository` };
  }
}

function dedupeDiagnostics(ds: Diagnostic[]): Diagnostic[] {
  if (ds.length < 2) return ds;
  const seen = new Set<string>();
  const out: Diagnostic[] = [];
  for (const d of ds) {
    const k = `${d.severity}\u0000${d.code}\u0000${d.file ?? ''}\u0000${d.line ?? ''}\u0000${d.column ?? ''}\u0000${d.message}`;
    if (seen.has(k)) continue;
    seen.add(k);
    out.push(d);
  }
  return out;
}

function hashText(s: string): string {
  return createHash('sha256').update(s).digest('hex');
}

function safeName(s: string): string {
  return s.replace(/[^A-Za-z0-9._-]+/g, '_');
}
