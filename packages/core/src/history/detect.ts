import type { LoadedAdapter } from '../adapter/loader.js';
import { BlobReader } from '../git/blob-reader.js';
import { runGit } from '../git/run-git.js';
import { matcher, TreeState } from '../git/tree-state.js';
import { UsageError, EXIT } from '../util/errors.js';
import type { RawChange } from '../git/log-pass.js';

/** Every regular file of a commit's tree (one `git ls-tree` process). */
export async function listTree(repo: string, commit: string): Promise<Array<{ path: string; blob: string; mode: string }>> {
  const r = await runGit(repo, ['-c', 'core.quotePath=false', 'ls-tree', '-r', '-z', '--full-tree', commit]);
  if (r.code !== 0) throw new Error(`git ls-tree failed: ${r.stderr.trim()}`);
  const out: Array<{ path: string; blob: string; mode: string }> = [];
  for (const entry of r.stdout.split('\0')) {
    if (!entry) continue;
    const tab = entry.indexOf('\t');
    const [mode = '', type = '', blob = ''] = entry.slice(0, tab).split(' ');
    if (type !== 'blob') continue;
    out.push({ path: entry.slice(tab + 1), blob, mode });
  }
  return out;
}

/** A tree state holding the files of one commit that match some globs. */
export function treeOf(files: Array<{ path: string; blob: string; mode: string }>, globs: readonly string[]): TreeState {
  const match = matcher(globs);
  const state = new TreeState();
  const changes: RawChange[] = files
    .filter((f) => match(f.path) && !f.path.includes('node_modules/'))
    .map((f) => ({ status: 'A', from: f.path, path: f.path, oldBlob: '', newBlob: f.blob, oldMode: '000000', newMode: f.mode }));
  state.apply(changes);
  return state;
}

/**
 * `--adapter auto`: the installed adapter that finds a schema at the analysed commit. Several
 * that apply, or none, is a one-line error that says what to do.
 */
export async function detectAdapter(repo: string, commit: string, adapters: LoadedAdapter[]): Promise<LoadedAdapter> {
  if (adapters.length === 0) throw new UsageError('no schema-strata adapter is installed', EXIT.usage);
  const files = await listTree(repo, commit);
  const reader = new BlobReader(repo, 5 * 1024 * 1024);
  const found: Array<{ a: LoadedAdapter; files: string[] }> = [];
  const searched: string[] = [];
  try {
    for (const a of adapters) {
      const tree = treeOf(files, a.adapter.watch);
      const loc = await a.adapter.locate(tree.view(commit, reader), { options: {} });
      if (loc.files.length > 0 || loc.ambiguous || loc.unsupported) found.push({ a, files: loc.files });
      else searched.push(`${a.adapter.name}: ${loc.searched ?? a.adapter.watch.join(', ')}`);
    }
  } finally {
    reader.close();
  }
  if (found.length === 1) return found[0]!.a;
  if (found.length > 1) {
    const list = found.map((f) => `${f.a.adapter.name} (${f.files.slice(0, 3).join(', ')}${f.files.length > 3 ? ', ...' : ''})`).join('; ');
    throw new UsageError(`several ORMs found at ${commit.slice(0, 10)}: ${list}; choose one with --adapter NAME`, EXIT.usage);
  }
  throw new UsageError(
    `no schema found at ${commit.slice(0, 10)} by the installed adapters (${searched.join('; ')}); name one with --adapter, or the files with --path`,
    EXIT.failure,
  );
}
