import { fork, type ChildProcess } from 'node:child_process';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';

interface Pending<J, R> {
  id: number;
  job: J;
  resolve: (r: R) => void;
  reject: (e: Error) => void;
}

interface Member<J, R> {
  proc: ChildProcess;
  busy?: Pending<J, R>;
  /** Called once when the current job is settled (used by `close`). */
  onIdle?: () => void;
}

type Reply<R> = { id: number; ok: true; result: R } | { id: number; ok: false; error: string };

/**
 * A pool of long-lived child processes that run jobs one at a time each: at most `size` at
 * once, in the order they were given. Each child is a Node process running `script`, which
 * answers every `{ id, job }` message with `{ id, ok, result | error }` (see `pool-child.ts`).
 * A child that dies mid-job rejects that job only; the next job gets a fresh child.
 *
 * ```ts
 * const pool = new ProcessPool<RepositoryJob, RepositoryOutcome>(2, repositoryChildScript());
 * const outcomes = await Promise.all(jobs.map((j) => pool.run(j)));
 * await pool.close();
 * ```
 */
export class ProcessPool<J, R> {
  private readonly members = new Set<Member<J, R>>();
  private readonly waiting: Pending<J, R>[] = [];
  private nextId = 1;
  private closed = false;

  /** Node flags of the children (see `childFlags`). */
  private readonly execArgv: string[];

  constructor(
    readonly size: number,
    private readonly script: string,
  ) {
    if (!Number.isInteger(size) || size < 1) throw new Error(`pool size must be a whole number >= 1, not ${size}`);
    this.execArgv = childFlags(size);
  }

  /** Run a job on the next free child. */
  run(job: J): Promise<R> {
    if (this.closed) return Promise.reject(new Error('the pool is closed'));
    return new Promise<R>((resolve, reject) => {
      this.waiting.push({ id: this.nextId++, job, resolve, reject });
      this.dispatch();
    });
  }

  /** Jobs running now. */
  get running(): number {
    let n = 0;
    for (const m of this.members) if (m.busy) n++;
    return n;
  }

  private spawn(): Member<J, R> {
    const proc = fork(this.script, [], { stdio: ['ignore', 'ignore', 'inherit', 'ipc'], execArgv: this.execArgv });
    const m: Member<J, R> = { proc };
    proc.on('message', (msg: Reply<R>) => {
      const p = m.busy;
      if (!p || msg.id !== p.id) return;
      m.busy = undefined;
      if (msg.ok) p.resolve(msg.result);
      else p.reject(new Error(msg.error));
      this.settled(m);
    });
    proc.on('exit', (code, signal) => {
      this.members.delete(m);
      const p = m.busy;
      m.busy = undefined;
      if (p) p.reject(new Error(`its worker process ended ${signal ? `by signal ${signal}` : `with code ${code}`}`));
      this.settled(m);
    });
    proc.on('error', () => {
      // reported through 'exit'
    });
    this.members.add(m);
    return m;
  }

  private settled(m: Member<J, R>): void {
    const f = m.onIdle;
    m.onIdle = undefined;
    f?.();
    this.dispatch();
  }

  private dispatch(): void {
    if (this.closed) return;
    while (this.waiting.length > 0) {
      let free: Member<J, R> | undefined;
      for (const m of this.members) if (!m.busy && m.proc.connected) free = free ?? m;
      if (!free && this.members.size < this.size) free = this.spawn();
      if (!free) return;
      const p = this.waiting.shift()!;
      free.busy = p;
      free.proc.send({ id: p.id, job: p.job });
    }
  }

  /** Stop every child (after its current job when `wait` is true) and reject the jobs not started. */
  async close(wait = true): Promise<void> {
    this.closed = true;
    for (const p of this.waiting.splice(0)) p.reject(new Error('the pool was closed before the job started'));
    await Promise.all(
      [...this.members].map(async (m) => {
        if (wait && m.busy) await new Promise<void>((resolve) => (m.onIdle = resolve));
        if (m.proc.exitCode !== null || m.proc.signalCode !== null) return;
        const exited = new Promise<void>((resolve) => m.proc.once('exit', () => resolve()));
        // a child ends when its parent disconnects; a busy one is stopped
        if (m.busy) m.proc.kill('SIGTERM');
        else if (m.proc.connected) m.proc.disconnect();
        else m.proc.kill('SIGTERM');
        await exited;
      }),
    );
  }
}

/**
 * Node flags for the children of a pool of `size`. A lone Node process keeps more than one core
 * busy (the garbage collector's helper threads, background compilation of the Prisma engine's
 * WebAssembly). When the pool has as many children as the machine has cores, those threads
 * only take time from the other children, so each child runs single-threaded (measured on two
 * cores: 2 jobs about 5% faster); a smaller pool leaves them the idle cores.
 */
export function childFlags(size: number, cores = availableParallelism()): string[] {
  return size >= cores ? ['--single-threaded'] : [];
}

/** The child script that runs study jobs (`runRepository`), as built into `dist/`. */
export function repositoryChildScript(): string {
  // from src/study/ (tests run the sources) and from dist/study/ alike, the built child
  return fileURLToPath(new URL('../../dist/study/pool-child.js', import.meta.url));
}
