import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createConnection, createServer } from 'node:net';

/** A free TCP port on the loopback interface. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.on('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      const port = typeof addr === 'object' && addr ? addr.port : 0;
      srv.close(() => resolve(port));
    });
  });
}

function ping(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const sock = createConnection({ host: '127.0.0.1', port });
    let buf = '';
    sock.setTimeout(500, () => {
      sock.destroy();
      resolve(false);
    });
    sock.on('error', () => resolve(false));
    sock.on('connect', () => sock.write('PING\r\n'));
    sock.on('data', (d) => {
      buf += d.toString();
      if (buf.includes('\r\n')) {
        sock.end();
        resolve(buf.startsWith('+PONG'));
      }
    });
  });
}

export interface RedisServer {
  url: string;
  port: number;
  /** Run redis-cli against this server and return its output (for checks of the queue's state). */
  cli(...args: string[]): string;
  stop(): Promise<void>;
}

/**
 * Start a private Redis server for a test: Debian's redis-server on a free loopback port, no
 * persistence, stopped by `stop()`. Nothing depends on a server started outside the tests;
 * scripts/ensure-system-deps.sh installs redis-server when it is missing, so a missing
 * binary is an error here, never a skip.
 */
export async function startRedis(): Promise<RedisServer> {
  const probe = spawnSync('redis-server', ['--version'], { encoding: 'utf8' });
  if (probe.error || probe.status !== 0) throw new Error('redis-server is not installed: run scripts/ensure-system-deps.sh (Debian package redis-server)');
  const port = await freePort();
  const proc: ChildProcess = spawn('redis-server', ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no'], { stdio: ['ignore', 'pipe', 'pipe'] });
  let log = '';
  proc.stdout!.on('data', (d) => (log += d.toString()));
  proc.stderr!.on('data', (d) => (log += d.toString()));
  const deadline = Date.now() + 10_000;
  while (!(await ping(port))) {
    if (proc.exitCode !== null || Date.now() > deadline) {
      proc.kill('SIGKILL');
      throw new Error(`redis-server did not start on port ${port}:\n${log}`);
    }
    await new Promise((r) => setTimeout(r, 50));
  }
  return {
    url: `redis://127.0.0.1:${port}`,
    port,
    cli: (...args: string[]) => spawnSync('redis-cli', ['-p', String(port), ...args], { encoding: 'utf8' }).stdout.trim(),
    stop: () =>
      new Promise<void>((resolve) => {
        if (proc.exitCode !== null) return resolve();
        proc.once('exit', () => resolve());
        proc.kill('SIGTERM');
      }),
  };
}
