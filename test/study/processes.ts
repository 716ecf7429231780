import { spawn, type ChildProcess } from 'node:child_process';
import { CLI, ROOT } from '../helpers/repo.js';

/** A CLI process running in the background, its output collected as it comes. */
export interface Background {
  proc: ChildProcess;
  stdout: () => string;
  stderr: () => string;
  /** Resolves with the exit code (or the signal's name) when the process ends. */
  exited: Promise<number | string>;
  /** Resolves with the first stderr line matching `re`. */
  waitForLine(re: RegExp, timeoutMs?: number): Promise<string>;
}

export function startCli(args: string[], env: NodeJS.ProcessEnv = {}): Background {
  const proc = spawn(process.execPath, [CLI, ...args], { cwd: ROOT, env: { ...process.env, NO_COLOR: '1', ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
  let out = '';
  let err = '';
  const watchers: Array<{ re: RegExp; resolve: (l: string) => void }> = [];
  proc.stdout!.on('data', (d) => (out += d.toString()));
  proc.stderr!.on('data', (d) => {
    err += d.toString();
    for (const w of [...watchers]) {
      const line = err.split('\n').find((l) => w.re.test(l));
      if (line) {
        watchers.splice(watchers.indexOf(w), 1);
        w.resolve(line);
      }
    }
  });
  const exited = new Promise<number | string>((resolve) => proc.on('exit', (code, signal) => resolve(code ?? signal ?? -1)));
  return {
    proc,
    stdout: () => out,
    stderr: () => err,
    exited,
    waitForLine(re, timeoutMs = 60_000) {
      const line = err.split('\n').find((l) => re.test(l));
      if (line) return Promise.resolve(line);
      return new Promise((resolve, reject) => {
        const timer = setTimeout(() => reject(new Error(`no line matching ${re} within ${timeoutMs} ms; stderr so far:\n${err}`)), timeoutMs);
        watchers.push({ re, resolve: (l) => (clearTimeout(timer), resolve(l)) });
      });
    },
  };
}

/** Stop a background process we started (SIGTERM, then SIGKILL after `graceMs`) and wait for it. */
export async function stopProcess(b: Background, graceMs = 10_000): Promise<void> {
  if (b.proc.exitCode !== null || b.proc.signalCode !== null) return;
  b.proc.kill('SIGTERM');
  const timer = setTimeout(() => b.proc.kill('SIGKILL'), graceMs);
  await b.exited;
  clearTimeout(timer);
}
