// Fixture histories of Knex migrations (test/fixtures/knex/<name>/history.json + files/) and the
// adapter's replay of them, shared by the Knex tests.
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { execFileSync } from 'node:child_process';
import { writeRepository, type Diagnostic, type ScriptedCommit, type SnapshotInput, type Table } from '@schema-strata/core';
import knexAdapter, { KnexSession, knexOptions, parseKnexFile, type KnexFacts } from '@schema-strata/adapter-knex';

export const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), '..', 'fixtures', 'knex');

interface Manifest {
  commits: Array<{ date: string; message: string; files: Record<string, string | null> }>;
}

export interface FixtureHistory {
  commits: ScriptedCommit[];
  /** The files of the repository after each commit: path -> text. */
  trees: Array<Map<string, string>>;
}

/** A fixture history: its scripted commits and the tree after each. */
export function loadFixture(name: string): FixtureHistory {
  const root = join(FIXTURES, name);
  const manifest = JSON.parse(readFileSync(join(root, 'history.json'), 'utf8')) as Manifest;
  const commits: ScriptedCommit[] = [];
  const trees: Array<Map<string, string>> = [];
  let tree = new Map<string, string>();
  for (const c of manifest.commits) {
    const files: Record<string, string | null> = {};
    tree = new Map(tree);
    for (const [path, src] of Object.entries(c.files)) {
      if (src === null) {
        files[path] = null;
        tree.delete(path);
      } else {
        const text = readFileSync(join(root, 'files', src), 'utf8');
        files[path] = text;
        tree.set(path, text);
      }
    }
    commits.push({ date: c.date, message: c.message, files });
    trees.push(tree);
  }
  return { commits, trees };
}

/** Write a fixture history as a git repository in a new temporary directory; returns the directory and the commit ids in order. */
export async function fixtureRepository(name: string): Promise<{ dir: string; history: FixtureHistory; commitIds: string[] }> {
  const history = loadFixture(name);
  const dir = mkdtempSync(join(tmpdir(), `strata-knex-${name}-`));
  await writeRepository(dir, history.commits);
  const ids = execFileSync('git', ['-C', dir, 'rev-list', '--reverse', '--first-parent', 'main'], { encoding: 'utf8' }).trim().split('\n');
  return { dir, history, commitIds: ids };
}

/**
 * The adapter's replay of one tree, step by step (without git): the files the adapter locates,
 * parsed with its parseFile, assembled by a session; returns the schema after each migration.
 */
export async function replaySteps(
  tree: Map<string, string>,
  options: Record<string, string | string[]>,
): Promise<Array<{ path: string; role: string; skipped: boolean; snapshot: SnapshotInput }>> {
  return (await replayTree(tree, options)).steps;
}

/** `replaySteps`, with the version's diagnostics. */
export async function replayTree(
  tree: Map<string, string>,
  options: Record<string, string | string[]>,
): Promise<{ steps: Array<{ path: string; role: string; skipped: boolean; snapshot: SnapshotInput }>; diagnostics: Diagnostic[] }> {
  const blobs = new Map<string, string>();
  const view = {
    commit: 'tree',
    paths: () => [...tree.keys()].sort(),
    has: (p: string) => tree.has(p),
    blob: (p: string) => {
      if (!tree.has(p)) return undefined;
      let b = blobs.get(p);
      if (!b) {
        b = `blob-${tree.get(p)!.length}-${p}`;
        blobs.set(p, b);
      }
      return b;
    },
    read: async (p: string) => tree.get(p),
    under: (d: string) => [...tree.keys()].filter((p) => d === '' || p.startsWith(d + '/')).sort(),
  };
  const located = await knexAdapter.locate(view, { options });
  const parse = (paths: Iterable<string>) =>
    [...new Set(paths)].sort().map((path) => {
      const r = parseKnexFile({ path, blob: view.blob(path)!, text: tree.get(path)! });
      return { path, blob: view.blob(path)!, ...(r.ok ? { facts: r.facts as KnexFacts } : {}) };
    });
  const files = parse(located.files);
  // (the adapter reads the files its locate step consulted: core hands their facts over)
  const consulted = parse(located.consulted ?? []).filter((f) => f.facts);
  const session = new KnexSession(knexOptions(options));
  const r = session.assemble({ files: files.filter((f) => f.facts), missing: files.filter((f) => !f.facts).map((f) => f.path), consulted });
  return { steps: session.trace(), diagnostics: 'diagnostics' in r ? r.diagnostics : [] };
}

/** Tables of a snapshot input with ids filled in (as core would). */
export function tablesOf(s: SnapshotInput): Table[] {
  return s.tables.map((t) => ({ ...t, id: t.id ?? (t.namespace ? `${t.namespace}.${t.name}` : t.name) }));
}
