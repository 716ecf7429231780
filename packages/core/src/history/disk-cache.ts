import { appendFileSync, existsSync, mkdirSync, readFileSync } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { homedir } from 'node:os';
import { join } from 'node:path';

/**
 * The user's cache directory for schema-strata: `$XDG_CACHE_HOME/schema-strata`, else
 * `~/.cache/schema-strata` (on macOS `~/Library/Caches/schema-strata`, on Windows
 * `%LOCALAPPDATA%\schema-strata`).
 */
export function defaultCacheDir(): string {
  if (process.env.XDG_CACHE_HOME) return join(process.env.XDG_CACHE_HOME, 'schema-strata');
  if (process.platform === 'darwin') return join(homedir(), 'Library', 'Caches', 'schema-strata');
  if (process.platform === 'win32' && process.env.LOCALAPPDATA) return join(process.env.LOCALAPPDATA, 'schema-strata');
  return join(homedir(), '.cache', 'schema-strata');
}

/**
 * An append-only pack of JSON records, one per line, kept in one file per namespace (adapter
 * name, adapter version and the hash of the options that change its output). The whole pack
 * is read once at the start of a run; new records are appended in one write at its end.
 * A torn or foreign line is skipped, so a crash or two runs appending at once lose at most
 * the records they were writing.
 *
 * Records of a `deferred` kind are not parsed when the pack is read: their lines are kept by
 * the record's `key` field and parsed only when `deferredRecord(key)` asks for one (a re-run
 * needs few of them). Such a record must be written with `k` first and `key` second (as
 * `add` does for an object literal `{ k, key, ... }`), so that the key can be read off the line.
 */
export class RecordPack<R extends { k: string }> {
  private readonly file: string;
  private pendingLines: string[] = [];
  readonly loaded: R[] = [];
  private readonly deferredLines = new Map<string, string>();

  /**
   * Open a pack, reading its file in the background: the file is read, and its records parsed,
   * while the caller waits for other work (a run's git log pass, say).
   */
  static async open<R extends { k: string }>(dir: string, namespace: string, deferred: readonly string[] = []): Promise<RecordPack<R>> {
    const file = join(dir, `${namespace}.jsonl`);
    const text = await readFile(file, 'utf8').catch((e: NodeJS.ErrnoException) => {
      if (e.code === 'ENOENT') return null;
      throw e;
    });
    return new RecordPack<R>(dir, namespace, deferred, text);
  }

  /** `text`: the file's content when the caller has read it (null: no file yet); else it is read here. */
  constructor(dir: string, namespace: string, deferred: readonly string[] = [], text?: string | null) {
    mkdirSync(dir, { recursive: true });
    this.file = join(dir, `${namespace}.jsonl`);
    const prefixes = deferred.map((k) => `{"k":${JSON.stringify(k)},"key":"`);
    if (text === undefined) text = existsSync(this.file) ? readFileSync(this.file, 'utf8') : null;
    if (text !== null) {
      let start = 0;
      lines: while (start < text.length) {
        let end = text.indexOf('\n', start);
        if (end < 0) end = text.length;
        if (end > start) {
          for (const prefix of prefixes) {
            if (!text.startsWith(prefix, start)) continue;
            const keyStart = start + prefix.length;
            const keyEnd = text.indexOf('"', keyStart);
            if (keyEnd > keyStart && keyEnd < end) this.deferredLines.set(text.slice(keyStart, keyEnd), text.slice(start, end));
            start = end + 1;
            continue lines;
          }
          try {
            const rec = JSON.parse(text.slice(start, end)) as R;
            if (rec && typeof rec.k === 'string') this.loaded.push(rec);
          } catch {
            // a torn line: skip it
          }
        }
        start = end + 1;
      }
    }
  }

  /** The deferred record with this key, parsed now; undefined when absent or torn. */
  deferredRecord(key: string): R | undefined {
    const line = this.deferredLines.get(key);
    if (line === undefined) return undefined;
    try {
      const rec = JSON.parse(line) as R;
      return rec && typeof rec.k === 'string' ? rec : undefined;
    } catch {
      return undefined;
    }
  }

  add(record: R): void {
    this.pendingLines.push(JSON.stringify(record));
  }

  /** Append what was added since the last flush, in one write. */
  flush(): void {
    if (this.pendingLines.length === 0) return;
    // The leading newline ends a line torn by an earlier crash, so that it cannot swallow ours.
    appendFileSync(this.file, '\n' + this.pendingLines.join('\n') + '\n');
    this.pendingLines = [];
  }

  get path(): string {
    return this.file;
  }
}
