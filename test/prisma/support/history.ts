/**
 * Helpers of the Prisma history tests: build a git repository with real commits, run the
 * extraction through the library (or the CLI), and validate the interchange document against
 * the JSON Schema that ships with core (ajv, draft 2020-12, with ajv-formats).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import addFormatsModule from 'ajv-formats';
import { extractHistory, toDocument, GENERATOR, writeRepository, type History, type InterchangeDocument, type ScriptedCommit } from '@schema-strata/core';
import prisma from '@schema-strata/adapter-prisma';

export const ROOT = join(import.meta.dirname, '..', '..', '..');
export const CLI = join(ROOT, 'packages', 'core', 'bin', 'schema-strata.js');

const made: string[] = [];
/** A fresh temporary directory, removed by `cleanUp`. */
export function tempDir(prefix = 'strata-prisma-'): string {
  const d = mkdtempSync(join(tmpdir(), prefix));
  made.push(d);
  return d;
}
export function cleanUp(): void {
  for (const d of made.splice(0)) rmSync(d, { recursive: true, force: true });
}

/** Dates one day apart from 2024-03-01, for scripted commits. */
export const day = (n: number): string => new Date(Date.UTC(2024, 2, 1 + n, 12)).toISOString().replace('.000Z', '+00:00');

/** A repository holding `commits` (made with git fast-import), in a new temporary directory. */
export async function repository(commits: Array<Omit<ScriptedCommit, 'date'> & { date?: string }>): Promise<string> {
  const dir = tempDir();
  await writeRepository(dir, commits.map((c, i) => ({ date: day(i), ...c })));
  return dir;
}

/** Extract the history of `repo` with the Prisma adapter, without the disk cache. */
export function extract(repo: string, opts: { paths?: string[]; maxFileBytes?: number } = {}): Promise<History> {
  return extractHistory({ repo, adapter: prisma, adapterOptions: { 'prisma-join-key': 'auto' }, ...opts });
}

const schemaPath = join(ROOT, 'packages', 'core', 'schema', 'history.schema.json');
let validator: ((doc: unknown) => boolean) & { errors?: unknown } | null = null;

/** Validate an interchange document against packages/core/schema/history.schema.json; returns ajv's errors. */
export function schemaErrors(doc: unknown): unknown[] {
  if (!validator) {
    const ajv = new Ajv2020({ allErrors: true, strict: false });
    const addFormats = (addFormatsModule as unknown as { default?: typeof addFormatsModule }).default ?? addFormatsModule;
    (addFormats as unknown as (a: Ajv2020) => void)(ajv);
    validator = ajv.compile(JSON.parse(readFileSync(schemaPath, 'utf8')));
  }
  return validator(doc) ? [] : ((validator.errors as unknown[]) ?? ['invalid']);
}

/** The interchange document of a history, as `extract` writes it. */
export function documentOf(h: History): InterchangeDocument {
  return JSON.parse(JSON.stringify(toDocument(h, GENERATOR))) as InterchangeDocument;
}

/** Run the CLI; returns exit code, standard output and standard error. */
export function cli(args: string[], env: NodeJS.ProcessEnv = {}): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', env: { ...process.env, NO_COLOR: '1', ...env } });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

/** Names of the tables of the snapshot of version `index`. */
export function tablesAt(h: History, index: number): string[] {
  const v = h.versions[index]!;
  if (!v.snapshot) return [];
  return h.snapshots.get(v.snapshot)!.tables.map((t) => t.table.id);
}
