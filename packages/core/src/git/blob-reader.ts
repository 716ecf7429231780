import { spawn, type ChildProcessWithoutNullStreams } from 'node:child_process';
import { gitEnv } from './run-git.js';

export type BlobRead =
  | { kind: 'text'; text: string; size: number }
  | { kind: 'binary'; size: number }
  | { kind: 'too-large'; size: number }
  | { kind: 'missing' };

interface Pending {
  /** `info` answers with a header only; `contents` with a header and the bytes. */
  type: 'info' | 'contents';
  resolve: (v: { size: number; data?: Buffer } | null) => void;
  reject: (e: Error) => void;
}

/**
 * One long-lived `git cat-file --batch-command` process for the whole run. Each blob's size is
 * asked first, so that a file over the size limit is never read; every distinct blob is read
 * at most once (results are cached by blob id).
 */
export class BlobReader {
  private child: ChildProcessWithoutNullStreams | null = null;
  private queue: Pending[] = [];
  private buf: Buffer = Buffer.alloc(0);
  /** Commands not yet written to git's standard input. */
  private outgoing = '';
  private readonly cache = new Map<string, Promise<BlobRead>>();
  private failed: Error | null = null;
  /** Distinct blobs whose contents were read from git. */
  blobsRead = 0;
  bytesRead = 0;

  constructor(
    private readonly repo: string,
    private readonly maxBytes: number,
  ) {}

  private start(): ChildProcessWithoutNullStreams {
    if (this.child) return this.child;
    const child = spawn('git', ['-C', this.repo, 'cat-file', '--batch-command'], {
      env: gitEnv(),
      stdio: ['pipe', 'pipe', 'pipe'],
    });
    child.stdout.on('data', (b: Buffer) => this.onData(b));
    const err: Buffer[] = [];
    child.stderr.on('data', (b: Buffer) => err.push(b));
    child.on('error', (e) => this.fail(e));
    child.on('close', (code) => {
      if (this.queue.length > 0) this.fail(new Error(`git cat-file exited (${code}): ${Buffer.concat(err).toString().trim()}`));
    });
    child.stdin.on('error', (e) => this.fail(e));
    this.child = child;
    return child;
  }

  private fail(e: Error): void {
    this.failed = e;
    for (const p of this.queue.splice(0)) p.reject(e);
  }

  private request(type: 'info' | 'contents', id: string): Promise<{ size: number; data?: Buffer } | null> {
    if (this.failed) return Promise.reject(this.failed);
    const child = this.start();
    return new Promise((resolve, reject) => {
      this.queue.push({ type, resolve, reject });
      // the commands asked in one turn go to git in one write (a write per command costs more
      // than the reading); answers come back in the same order either way
      if (this.outgoing === '') queueMicrotask(() => this.flush(child));
      this.outgoing += `${type} ${id}\n`;
    });
  }

  private flush(child: ChildProcessWithoutNullStreams): void {
    const text = this.outgoing;
    this.outgoing = '';
    if (text && child.stdin.writable) child.stdin.write(text);
  }

  private onData(b: Buffer): void {
    this.buf = this.buf.length === 0 ? b : Buffer.concat([this.buf, b]);
    for (;;) {
      const head = this.queue[0];
      if (!head) return;
      const nl = this.buf.indexOf(0x0a);
      if (nl < 0) return;
      const header = this.buf.subarray(0, nl).toString('utf8');
      if (header.endsWith(' missing') || header.endsWith(' ambiguous')) {
        this.buf = this.buf.subarray(nl + 1);
        this.queue.shift();
        head.resolve(null);
        continue;
      }
      const size = Number(header.slice(header.lastIndexOf(' ') + 1));
      if (head.type === 'info') {
        this.buf = this.buf.subarray(nl + 1);
        this.queue.shift();
        head.resolve({ size });
        continue;
      }
      // contents: header, `size` bytes, then a newline
      if (this.buf.length < nl + 1 + size + 1) return;
      const data = Buffer.from(this.buf.subarray(nl + 1, nl + 1 + size));
      this.buf = this.buf.subarray(nl + 1 + size + 1);
      this.queue.shift();
      head.resolve({ size, data });
    }
  }

  /** Read a blob once: its text, or why there is none (binary, over the size limit, missing). */
  read(id: string): Promise<BlobRead> {
    let p = this.cache.get(id);
    if (!p) {
      p = this.readUncached(id);
      this.cache.set(id, p);
    }
    return p;
  }

  private async readUncached(id: string): Promise<BlobRead> {
    const info = await this.request('info', id);
    if (!info) return { kind: 'missing' };
    if (info.size > this.maxBytes) return { kind: 'too-large', size: info.size };
    const got = await this.request('contents', id);
    if (!got || !got.data) return { kind: 'missing' };
    this.blobsRead++;
    this.bytesRead += got.size;
    const data = got.data;
    if (isBinary(data)) return { kind: 'binary', size: got.size };
    let text = data.toString('utf8');
    if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    return { kind: 'text', text, size: got.size };
  }

  /** Drop a cached result once it is no longer needed (keeps memory flat on long walks); whether there was one. */
  forget(id: string): boolean {
    return this.cache.delete(id);
  }

  close(): void {
    if (this.child) {
      this.flush(this.child);
      this.child.stdin.end();
      this.child = null;
    }
  }
}

/** A NUL byte in the first 8000 bytes marks a file as binary (the rule git itself uses). */
export function isBinary(data: Buffer): boolean {
  const n = Math.min(data.length, 8000);
  for (let i = 0; i < n; i++) if (data[i] === 0) return true;
  return false;
}
