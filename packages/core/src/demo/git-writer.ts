import { spawn } from 'node:child_process';
import { mkdirSync } from 'node:fs';
import { gitEnv } from '../git/run-git.js';

/** One commit of a scripted history. */
export interface ScriptedCommit {
  /** Committer and author date, ISO 8601 (with offset). */
  date: string;
  message: string;
  /** Files to write (path -> text), or to delete (path -> null). */
  files: Record<string, string | null>;
  /** When true, the commit's tree is exactly `files` (everything else is deleted). */
  replaceTree?: boolean;
  /** Branch of the commit (default `main`); a new branch starts at `from`, or at main's tip. */
  branch?: string;
  /** Index of the commit a new branch starts from. */
  from?: number;
  /** Index of a commit merged into this one (its second parent). */
  merge?: number;
  author?: { name: string; email: string };
}

const DEFAULT_AUTHOR = { name: 'Co-op Maintainer', email: 'maintainer@tool-coop.example' };

function epoch(date: string): string {
  const ms = Date.parse(date);
  if (Number.isNaN(ms)) throw new Error(`bad date ${date}`);
  const m = /([+-])(\d{2}):?(\d{2})$/.exec(date);
  const tz = m ? `${m[1]}${m[2]}${m[3]}` : '+0000';
  return `${Math.floor(ms / 1000)} ${tz}`;
}

/** The git fast-import stream of a scripted history (deterministic: same script, same commit ids). */
export function fastImportStream(commits: readonly ScriptedCommit[], opts: { continueFrom?: string } = {}): Buffer {
  const parts: Buffer[] = [];
  const push = (s: string): void => {
    parts.push(Buffer.from(s, 'utf8'));
  };
  const tips = new Map<string, number>();
  commits.forEach((c, i) => {
    const branch = c.branch ?? 'main';
    const mark = i + 1;
    const author = c.author ?? DEFAULT_AUTHOR;
    const when = epoch(c.date);
    push(`commit refs/heads/${branch}\nmark :${mark}\n`);
    push(`author ${author.name} <${author.email}> ${when}\ncommitter ${author.name} <${author.email}> ${when}\n`);
    const msg = Buffer.from(c.message.endsWith('\n') ? c.message : c.message + '\n', 'utf8');
    push(`data ${msg.length}\n`);
    parts.push(msg);
    const tip = tips.get(branch);
    if (tip === undefined) {
      const start = c.from ?? tips.get('main');
      if (start !== undefined) push(`from :${start + 1}\n`);
      else if (opts.continueFrom && branch === 'main') push(`from ${opts.continueFrom}\n`);
    }
    if (c.merge !== undefined) push(`merge :${c.merge + 1}\n`);
    if (c.replaceTree) push('deleteall\n');
    for (const [path, text] of Object.entries(c.files).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
      if (text === null) {
        push(`D ${path}\n`);
        continue;
      }
      const data = Buffer.from(text, 'utf8');
      push(`M 100644 inline ${path}\ndata ${data.length}\n`);
      parts.push(data);
      push('\n');
    }
    push('\n');
    tips.set(branch, i);
  });
  push('done\n');
  return Buffer.concat(parts);
}

function run(cwd: string, args: string[], input?: Buffer): Promise<void> {
  return new Promise((resolve, reject) => {
    const env = {
      ...gitEnv(),
      GIT_CONFIG_GLOBAL: '/dev/null',
      GIT_AUTHOR_NAME: DEFAULT_AUTHOR.name,
      GIT_AUTHOR_EMAIL: DEFAULT_AUTHOR.email,
      GIT_COMMITTER_NAME: DEFAULT_AUTHOR.name,
      GIT_COMMITTER_EMAIL: DEFAULT_AUTHOR.email,
    };
    const child = spawn('git', args, { cwd, env, stdio: ['pipe', 'ignore', 'pipe'] });
    const err: Buffer[] = [];
    child.stderr.on('data', (b: Buffer) => err.push(b));
    child.on('error', reject);
    child.on('close', (code) => (code === 0 ? resolve() : reject(new Error(`git ${args[0]} failed: ${Buffer.concat(err).toString().trim()}`))));
    child.stdin.end(input);
  });
}

/**
 * Create a git repository at `dir` holding a scripted history, with real commits made by
 * `git fast-import` (one process), and check out `main` into its work tree.
 */
export async function writeRepository(dir: string, commits: readonly ScriptedCommit[], opts: { checkout?: boolean } = {}): Promise<void> {
  mkdirSync(dir, { recursive: true });
  await run(dir, ['init', '--quiet', '--initial-branch=main', '.']);
  await run(dir, ['fast-import', '--quiet', '--done'], fastImportStream(commits));
  if (opts.checkout !== false) await run(dir, ['checkout', '--quiet', '--force', 'main']);
}

/** Append commits to `main` of an existing repository (used by the benchmark's re-run). */
export async function appendCommits(dir: string, commits: readonly ScriptedCommit[]): Promise<void> {
  await run(dir, ['fast-import', '--quiet', '--done'], fastImportStream(commits, { continueFrom: 'refs/heads/main^0' }));
}
