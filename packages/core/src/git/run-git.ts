import { spawn } from 'node:child_process';
import { UsageError } from '../util/errors.js';

export interface GitResult {
  stdout: string;
  stderr: string;
  code: number;
}

/** The environment for every git process: no pager, no prompts, no localisation, no replace refs. */
export function gitEnv(): NodeJS.ProcessEnv {
  return {
    ...process.env,
    GIT_TERMINAL_PROMPT: '0',
    GIT_PAGER: 'cat',
    LC_ALL: 'C',
    LANG: 'C',
    GIT_NO_REPLACE_OBJECTS: '1',
    GIT_CONFIG_NOSYSTEM: '1',
  };
}

/** Run one short git command to completion and collect its output. */
export function runGit(repo: string, args: string[], input?: string): Promise<GitResult> {
  return new Promise((resolve, reject) => {
    const child = spawn('git', ['-C', repo, ...args], { env: gitEnv(), stdio: ['pipe', 'pipe', 'pipe'] });
    const out: Buffer[] = [];
    const err: Buffer[] = [];
    child.stdout.on('data', (b: Buffer) => out.push(b));
    child.stderr.on('data', (b: Buffer) => err.push(b));
    child.on('error', (e: NodeJS.ErrnoException) => {
      if (e.code === 'ENOENT') reject(new UsageError('git is not installed or not on PATH'));
      else reject(e);
    });
    child.on('close', (code) =>
      resolve({ stdout: Buffer.concat(out).toString('utf8'), stderr: Buffer.concat(err).toString('utf8'), code: code ?? 1 }),
    );
    if (input !== undefined) child.stdin.end(input);
    else child.stdin.end();
  });
}
