import { spawn } from 'node:child_process';
import { gitEnv } from './run-git.js';

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
 * The log pass: one `git log` process over the first-parent line of `ref`, oldest first, with
 * raw diffs (full blob ids) limited to `pathspecs` (and to the paths `keep` accepts, when given:
 * a commit left with no change is not listed). Rename detection (`renames`) is asked only
 * when literal `--path` entries must be followed back through moves: it is the costliest part
 * of the pass, and the tree state needs none (a rename is a deletion plus an addition). Merges are diffed
 * against their first parent, so what a merge brings in is seen at the merge.
 */
export function logPass(
  repo: string,
  ref: string,
  pathspecs: string[],
  onCommit?: (n: number) => void,
  opts: { renames?: boolean; keep?: (path: string) => boolean } = {},
): Promise<LoggedCommit[]> {
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
    const commits: LoggedCommit[] = [];
    const keep = opts.keep;
    const parser = new RawLogParser((c) => {
      if (keep) {
        // git selected more than was asked (see logSelection): only the wanted paths, and only
        // commits that still change one
        c.changes = c.changes.filter((ch) => keep(ch.path) || (ch.from !== ch.path && keep(ch.from)));
        if (c.changes.length === 0) return;
      }
      commits.push(c);
      onCommit?.(commits.length);
    });
    const err: Buffer[] = [];
    child.stdout.on('data', (b: Buffer) => parser.push(b));
    child.stderr.on('data', (b: Buffer) => err.push(b));
    child.on('error', reject);
    child.on('close', (code) => {
      if (code !== 0) {
        reject(new Error(`git log failed: ${Buffer.concat(err).toString('utf8').trim()}`));
        return;
      }
      parser.end();
      resolve(commits);
    });
  });
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
