import { spawn } from 'node:child_process';
import { gitEnv, runGit } from './run-git.js';
import { EXIT, UsageError } from '../util/errors.js';

/** One entry of a commit's raw diff against its first parent. */
export interface RawChange {
  /** A added, M modified, D deleted, T type changed, R renamed, C copied. */
  status: 'A' | 'M' | 'D' | 'T' | 'R' | 'C';
  /** Path before (for R and C, the source; otherwise the same as `path`). */
  from: string;
  path: string;
  oldBlob: string;
  newBlob: string;
  oldMode: string;
  newMode: string;
}

export interface LoggedCommit {
  commit: string;
  /** First parent, or null for a root commit. */
  parent: string | null;
  parents: string[];
  authorTime: string;
  committerTime: string;
  subject: string;
  changes: RawChange[];
}

const RS = '\x1e';
const US = '\x1f';

/**
 * The log pass: `git log` over the first-parent line of `ref` (two processes at once, each over
 * a part of the line, when it has LOG_SPLIT_MIN commits or more), oldest first, with
 * raw diffs (full blob ids) limited to `pathspecs` (and to the paths `keep` accepts, when given:
 * a commit left with no change is not listed). Rename detection (`renames`) is asked only
 * when literal `--path` entries must be followed back through moves: it is the costliest part
 * of the pass, and the tree state needs none (a rename is a deletion plus an addition). Merges are diffed
 * against their first parent, so what a merge brings in is seen at the merge.
 */
export async function logPass(
  repo: string,
  ref: string,
  pathspecs: string[],
  onCommit?: (n: number) => void,
  opts: LogOptions = {},
): Promise<LoggedCommit[]> {
  const stream = logStream(repo, ref, pathspecs, onCommit, opts);
  while (await stream.more());
  return stream.commits as LoggedCommit[];
}

/** The log pass as it comes: its commits so far, and a wait for more. */
export interface CommitStream {
  /** The commits logged so far, oldest first; it grows until `more` resolves to false. */
  readonly commits: readonly LoggedCommit[];
  /**
   * Resolves to true once `commits` holds commits that it did not hold at the last call, to false
   * once the log is complete and all of them are in; rejects when git failed.
   */
  more(): Promise<boolean>;
}

/**
 * The log pass of `logPass`, handed over as git writes it, so that a caller can work on the first
 * commits while git still diffs the later ones. When the line is logged in two parts, the older
 * part comes as it is written and the newer one once both are complete.
 */
export function logStream(
  repo: string,
  ref: string,
  pathspecs: string[],
  onCommit?: (n: number) => void,
  opts: LogOptions = {},
): CommitStream {
  const commits: LoggedCommit[] = [];
  let complete = false;
  let failure: { error: unknown } | null = null;
  let waiting: (() => void) | null = null;
  const wake = (): void => {
    const w = waiting;
    waiting = null;
    w?.();
  };
  const run = async (): Promise<void> => {
    const splitAt = opts.splitAt ?? splitDefault;
    const into = (c: LoggedCommit): void => {
      commits.push(c);
      onCommit?.(commits.length);
    };
    if (ref.includes('..') || ref.startsWith('-') || !Number.isFinite(splitAt)) return logRange(repo, ref, pathspecs, opts, into, wake);
    // a long line is logged in two parts at once, by two git processes: each commit's diff is
    // against its first parent whichever part lists it, so the parts joined are the whole log
    const line = await runGit(repo, ['rev-list', '--first-parent', '--end-of-options', ref, '--']);
    const ids = line.code === 0 ? line.stdout.split('\n').filter(Boolean) : [];
    if (ids.length < splitAt) return logRange(repo, ref, pathspecs, opts, into, wake);
    // newest first; a commit's diff tends to cost with the size of its tree, which tends to grow, so
    // the older part takes about 70% of the commits (equal halves of a cost that grows linearly)
    const mid = ids[Math.floor(ids.length * 0.3)]!;
    const newer: LoggedCommit[] = [];
    const tick = onCommit ? () => onCommit(commits.length + newer.length) : undefined;
    await Promise.all([
      logRange(repo, mid, pathspecs, opts, (c) => (commits.push(c), tick?.()), wake),
      logRange(repo, `${mid}..${ref}`, pathspecs, opts, (c) => (newer.push(c), tick?.()), () => undefined),
    ]);
    for (const c of newer) commits.push(c);
  };
  run().then(
    () => {
      complete = true;
      wake();
    },
    (error: unknown) => {
      failure = { error };
      wake();
    },
  );
  let handed = 0;
  return {
    commits,
    async more(): Promise<boolean> {
      for (;;) {
        if (failure) throw (failure as { error: unknown }).error;
        if (commits.length > handed) {
          handed = commits.length;
          return true;
        }
        if (complete) return false;
        await new Promise<void>((resolve) => {
          const before = waiting;
          waiting = before ? () => (before(), resolve()) : resolve;
        });
      }
    },
  };
}

export interface LogOptions {
  /** Follow renames (`-M`): only for literal `--path` entries. */
  renames?: boolean;
  /** Keep only the changes of the paths it accepts (see `logSelection`). */
  keep?: (path: string) => boolean;
  /** Log a first-parent line of at least this many commits in two parts at once (default LOG_SPLIT_MIN, see `logInParts`; Infinity: never). */
  splitAt?: number;
}

/** First-parent lines shorter than this are logged by one git process (a second would cost more than it saves). */
export const LOG_SPLIT_MIN = 600;

let splitDefault = LOG_SPLIT_MIN;

/**
 * Whether this process logs long lines in two parts (the default). A study's pool children turn
 * it off: their parallelism is across repositories, and the `rev-list` that finds the split
 * point is one more process for each repository, which costs there with the child's size.
 */
export function logInParts(on: boolean): void {
  splitDefault = on ? LOG_SPLIT_MIN : Infinity;
}

/**
 * One `git log` process over `ref` (a revision or a range), oldest first: each commit goes to
 * `into` as soon as it is parsed, and `chunk` is called after each piece of output.
 */
function logRange(
  repo: string,
  ref: string,
  pathspecs: string[],
  opts: LogOptions,
  into: (c: LoggedCommit) => void,
  chunk: () => void,
): Promise<void> {
  const args = [
    '-C', repo,
    '-c', 'core.quotePath=false',
    '-c', 'diff.renameLimit=10000',
    'log', '--first-parent', '--diff-merges=first-parent', '--raw', '-z', '--no-abbrev', ...(opts.renames ? ['-M'] : ['--no-renames']), '--root',
    '--reverse', '--no-color', '--no-ext-diff', '--no-textconv',
    `--format=${RS}%H${US}%P${US}%aI${US}%cI${US}%s`,
    ref, '--', ...pathspecs,
  ];
  return new Promise((resolve, reject) => {
    const child = spawn('git', args, { env: gitEnv(), stdio: ['ignore', 'pipe', 'pipe'] });
    const keep = opts.keep;
    const parser = new RawLogParser((c) => {
      if (keep) {
        // git selected more than was asked (see logSelection): only the wanted paths, and only
        // commits that still change one
        c.changes = c.changes.filter((ch) => keep(ch.path) || (ch.from !== ch.path && keep(ch.from)));
        if (c.changes.length === 0) return;
      }
      into(c);
    });
    const err: Buffer[] = [];
    child.stdout.on('data', (b: Buffer) => {
      parser.push(b);
      chunk();
    });
    child.stderr.on('data', (b: Buffer) => err.push(b));
    child.on('error', reject);
    child.on('close', (code) => {
      if (code !== 0) {
        reject(logFailure(Buffer.concat(err).toString('utf8').trim(), opts.renames === true));
        return;
      }
      parser.end();
      resolve();
    });
  });
}

/**
 * The error of a failed `git log`. An object git cannot read (a partial or damaged clone) is the
 * user's to fix, and says how: rename detection reads the contents of the files it compares.
 */
export function logFailure(stderr: string, renames: boolean): Error {
  const missing = /unable to read ([0-9a-f]{40,64})/.exec(stderr);
  if (!missing) return new Error(`git log failed: ${stderr}`);
  const why = renames ? ', which following the literal --path entries through renames needs (rename detection compares file contents)' : '';
  const fix = renames ? 'fetch the missing objects, or give the paths as globs (DIR/**), which are not followed through renames' : 'fetch the missing objects';
  return new UsageError(`git cannot read object ${missing[1]} of the repository${why}; the clone may be partial or damaged: ${fix}`, EXIT.failure);
}

/** Incremental parser of `git log --raw -z` output in the format above. */
export class RawLogParser {
  private tail = '';
  private current: LoggedCommit | null = null;
  /** Meta of a raw entry waiting for its paths, and the paths read so far. */
  private pending: { meta: string[]; paths: string[]; need: number } | null = null;

  constructor(private readonly emit: (c: LoggedCommit) => void) {}

  push(chunk: Buffer): void {
    const text = this.tail + chunk.toString('utf8');
    const tokens = text.split('\0');
    this.tail = tokens.pop() ?? '';
    for (const t of tokens) this.token(t);
  }

  end(): void {
    if (this.tail.length > 0) this.token(this.tail);
    this.tail = '';
    this.flush();
  }

  private flush(): void {
    if (this.current) this.emit(this.current);
    this.current = null;
  }

  private token(raw: string): void {
    if (this.pending) {
      this.pending.paths.push(raw);
      if (this.pending.paths.length === this.pending.need) this.finishEntry();
      return;
    }
    const t = raw.startsWith('\n') ? raw.slice(1) : raw;
    if (t.startsWith(RS)) {
      this.flush();
      this.header(t.slice(1));
      return;
    }
    if (t.startsWith(':')) {
      const meta = t.slice(1).split(' ');
      const status = meta[4] ?? '';
      this.pending = { meta, paths: [], need: status.startsWith('R') || status.startsWith('C') ? 2 : 1 };
      return;
    }
    // An empty token appears after a header that has no raw entries.
  }

  private header(h: string): void {
    const [commit = '', parents = '', authorTime = '', committerTime = '', ...rest] = h.split(US);
    const ps = parents.split(' ').filter(Boolean);
    this.current = {
      commit,
      parent: ps[0] ?? null,
      parents: ps,
      authorTime,
      committerTime,
      subject: rest.join(US).replace(/\n$/, ''),
      changes: [],
    };
  }

  private finishEntry(): void {
    const p = this.pending!;
    this.pending = null;
    const [oldMode = '', newMode = '', oldBlob = '', newBlob = '', statusRaw = ''] = p.meta;
    const status = statusRaw.charAt(0) as RawChange['status'];
    const from = p.paths[0]!;
    const path = p.paths.length === 2 ? p.paths[1]! : from;
    this.current?.changes.push({ status, from, path, oldBlob, newBlob, oldMode, newMode });
  }
}
