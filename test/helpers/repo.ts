import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeRepository, type ScriptedCommit, main } from '@schema-strata/core';

/** A fresh temporary directory, removed by the returned cleanup. */
export function tempDir(prefix = 'strata-test-'): { dir: string; cleanup: () => void } {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  return { dir, cleanup: () => rmSync(dir, { recursive: true, force: true }) };
}

/** Build a repository of real git commits (git fast-import) and return its path. */
export async function makeRepo(root: string, name: string, commits: ScriptedCommit[]): Promise<string> {
  const dir = join(root, name);
  await writeRepository(dir, commits);
  return dir;
}

/** Run git in a repository and return its standard output. */
export function git(repo: string, ...args: string[]): string {
  return execFileSync('git', ['-C', repo, ...args], { encoding: 'utf8', env: { ...process.env, GIT_CONFIG_GLOBAL: '/dev/null' } });
}

export const ROOT = resolve(fileURLToPath(new URL('.', import.meta.url)), '..', '..');
export const CLI = join(ROOT, 'packages', 'core', 'bin', 'schema-strata.js');

/** Run the CLI as a separate process, as a user would. */
export function runCli(args: string[], opts: { cwd?: string; env?: NodeJS.ProcessEnv } = {}): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [CLI, ...args], {
    cwd: opts.cwd ?? ROOT,
    encoding: 'utf8',
    env: { ...process.env, NO_COLOR: '1', ...opts.env },
    maxBuffer: 1 << 28,
  });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

/** Run the CLI in this process with captured output (faster; same code path as the bin). */
export async function runMain(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const out = { write: (s: string) => ((stdout += s), true), isTTY: false } as unknown as NodeJS.WritableStream;
  const err = { write: (s: string) => ((stderr += s), true), isTTY: false } as unknown as NodeJS.WriteStream;
  const code = await main(args, { stdout: out, stderr: err, env: { ...process.env, NO_COLOR: '1' } });
  return { code, stdout, stderr };
}

/** A date n days after 2024-01-01, as ISO 8601 with offset. */
export function day(n: number, hour = 12): string {
  const d = new Date(Date.UTC(2024, 0, 1 + n, hour));
  return d.toISOString().replace(/\.\d{3}Z$/, '+00:00');
}

/** A small Prisma schema of the tool-lending scenario, with `extra` appended. */
export function prismaSchema(models: string, provider = 'postgresql'): string {
  return `datasource db {\n  provider = "${provider}"\n  url      = env("DATABASE_URL")\n}\n\ngenerator client {\n  provider = "prisma-client-js"\n}\n\n${models}\n`;
}

export const MEMBER = `model Member {\n  id    Int    @id @default(autoincrement())\n  name  String\n  loans Loan[]\n}\n`;
export const TOOL = `model Tool {\n  id    Int    @id @default(autoincrement())\n  label String\n  loans Loan[]\n}\n`;
export const LOAN = `model Loan {\n  id       Int    @id @default(autoincrement())\n  memberId Int\n  toolId   Int\n  member   Member @relation(fields: [memberId], references: [id])\n  tool     Tool   @relation(fields: [toolId], references: [id])\n}\n`;
