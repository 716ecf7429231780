/** Running the TypeORM adapter's own steps (locate, parse, assemble) on files held in memory. */
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeRepository, type AdapterOptionValues, type Diagnostic, type Located, type ScriptedCommit, type SnapshotInput, type TreeView } from '@schema-strata/core';
import { typeormAdapter, type TypeormFileFacts } from '@schema-strata/adapter-typeorm';

export const FIXTURES = fileURLToPath(new URL('../fixtures/typeorm/', import.meta.url));

/** Every file under a fixture folder, by path relative to it. */
export function readFixture(name: string): Record<string, string> {
  const root = join(FIXTURES, name);
  const out: Record<string, string> = {};
  const walk = (dir: string): void => {
    for (const e of readdirSync(dir).sort()) {
      const p = join(dir, e);
      if (statSync(p).isDirectory()) walk(p);
      else out[relative(root, p).split('\\').join('/')] = readFileSync(p, 'utf8');
    }
  };
  walk(root);
  return out;
}

/**
 * Write scripted commits as a git repository at `dir` (a null text removes the file) and give
 * the commit ids in order and the whole tree of files of each commit, by id.
 */
export async function writeWithTrees(dir: string, commits: ScriptedCommit[]): Promise<{ ids: string[]; trees: Map<string, Record<string, string>> }> {
  await writeRepository(dir, commits, { checkout: false });
  const ids = execFileSync('git', ['-C', dir, 'rev-list', '--reverse', 'main'], { encoding: 'utf8' }).trim().split('\n');
  const trees = new Map<string, Record<string, string>>();
  const tree: Record<string, string> = {};
  commits.forEach((c, i) => {
    for (const [p, t] of Object.entries(c.files)) {
      if (t === null) delete tree[p];
      else tree[p] = t;
    }
    trees.set(ids[i]!, { ...tree });
  });
  return { ids, trees };
}

const blobOf = (text: string): string => createHash('sha1').update(text).digest('hex');

/** A tree view over files in memory, as core gives adapters one commit's tree. */
export function memoryTree(files: Record<string, string>): TreeView {
  const paths = Object.keys(files).sort();
  return {
    commit: 'memory',
    paths: () => paths,
    has: (p) => p in files,
    blob: (p) => (p in files ? blobOf(files[p]!) : undefined),
    read: async (p) => files[p],
    under: (dir) => paths.filter((p) => p.startsWith(dir.replace(/\/+$/, '') + '/')),
  };
}

export interface AdapterRun {
  located: Located;
  snapshot?: SnapshotInput;
  failed?: boolean;
  diagnostics: Diagnostic[];
}

/** The adapter's snapshot of one set of files: locate, then parse each located file, then assemble. */
export async function runAdapter(files: Record<string, string>, options: AdapterOptionValues = {}, paths?: string[]): Promise<AdapterRun> {
  const tree = memoryTree(files);
  const located = await typeormAdapter.locate(tree, { options, ...(paths ? { paths } : {}) });
  const diagnostics: Diagnostic[] = [...(located.diagnostics ?? [])];
  const inputs: Array<{ path: string; blob: string; facts?: TypeormFileFacts }> = [];
  const missing: string[] = [];
  for (const path of located.files) {
    const text = files[path]!;
    const r = await typeormAdapter.parseFile!({ path, blob: blobOf(text), text }, options);
    diagnostics.push(...(r.diagnostics ?? []));
    if (r.ok) {
      // facts are plain JSON: what the disk cache stores must come back the same
      inputs.push({ path, blob: blobOf(text), facts: JSON.parse(JSON.stringify(r.facts)) as TypeormFileFacts });
    } else missing.push(path);
  }
  // the consulted files' facts too, as core hands them over to an adapter that reads them (readsConsulted)
  const consulted: typeof inputs = [];
  for (const path of located.consulted ?? []) {
    const text = files[path];
    if (text === undefined) continue;
    const r = await typeormAdapter.parseFile!({ path, blob: blobOf(text), text }, options);
    if (r.ok) consulted.push({ path, blob: blobOf(text), facts: JSON.parse(JSON.stringify(r.facts)) as TypeormFileFacts });
  }
  const result = await typeormAdapter.assemble({ files: inputs, missing, consulted }, options);
  diagnostics.push(...result.diagnostics);
  if ('failed' in result) return { located, failed: true, diagnostics };
  return { located, snapshot: result.snapshot, diagnostics };
}
