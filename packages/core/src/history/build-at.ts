import type { AdapterOptionValues, AssembleFile, SchemaAdapter } from '../adapter/api.js';
import { BlobReader } from '../git/blob-reader.js';
import { isGlob, matcher, userSelection } from '../git/tree-state.js';
import { openRepository } from '../git/repository.js';
import type { Diagnostic } from '../model/types.js';
import { UsageError, EXIT } from '../util/errors.js';
import { listTree, treeOf } from './detect.js';
import { DEFAULT_MAX_FILE_BYTES } from './engine.js';
import { SnapshotStore, materialise } from './snapshot-store.js';
import type { Table, ViewRef } from '../model/types.js';

export interface SchemaAtCommit {
  commit: string;
  files: string[];
  tables: Table[];
  views: ViewRef[];
  hash: string;
  meaningHash: string;
  diagnostics: Diagnostic[];
  failed: boolean;
}

/**
 * The schema at one commit, built directly from that commit's tree (one `git ls-tree`, one
 * blob reader); no history walk. Used by `show` and `diff`.
 */
export async function schemaAt(req: {
  repo: string;
  ref: string;
  adapter: SchemaAdapter;
  options?: AdapterOptionValues;
  paths?: string[];
  maxFileBytes?: number;
}): Promise<SchemaAtCommit> {
  const info = await openRepository(req.repo, req.ref);
  const options = req.options ?? {};
  const all = await listTree(req.repo, info.head);
  const userPaths = (req.paths ?? []).map((p) => p.replace(/^\.\/+/, '').replace(/\/+$/, ''));
  const globs = [...req.adapter.watch, ...userPaths.flatMap((p) => (isGlob(p) ? [p] : [p, `${p}/**`]))];
  const tree = treeOf(all, globs);
  const reader = new BlobReader(req.repo, req.maxFileBytes ?? DEFAULT_MAX_FILE_BYTES);
  try {
    const view = tree.view(info.head, reader);
    let located;
    if (userPaths.length > 0) {
      located = await req.adapter.locate(view, { ...userSelection(view, matcher(userPaths.filter(isGlob)), userPaths.filter((x) => !isGlob(x))), options });
    } else {
      located = await req.adapter.locate(view, { options });
    }
    if (located.ambiguous) {
      const list = located.ambiguous.candidates.map((c) => c.join(' + ')).join('; ');
      throw new UsageError(`several independent schemas found (${list}); choose one with ${located.ambiguous.hint}`, EXIT.failure);
    }
    const files = [...new Set(located.files)].sort();
    if (files.length === 0) {
      throw new UsageError(`no ${req.adapter.name} schema at ${req.ref}${located.searched ? `; searched ${located.searched}` : ''}`, EXIT.failure);
    }
    const diagnostics: Diagnostic[] = [...(located.diagnostics ?? [])];
    const inputs: AssembleFile<unknown>[] = [];
    const missing: string[] = [];
    for (const path of files) {
      const blob = view.blob(path)!;
      const got = await reader.read(blob);
      if (got.kind !== 'text') {
        diagnostics.push({ severity: 'error', code: `file/${got.kind}`, file: path, message: `${path}: ${got.kind}; not read` });
        missing.push(path);
        continue;
      }
      if (req.adapter.parseFile) {
        const r = await req.adapter.parseFile({ path, blob, text: got.text }, options);
        for (const d of r.diagnostics ?? []) diagnostics.push({ ...d, file: d.file ?? path });
        if (r.ok) inputs.push({ path, blob, facts: r.facts });
        else missing.push(path);
      } else {
        inputs.push({ path, blob, text: got.text });
      }
    }
    // the facts of the files the locate step consulted, for an adapter whose assembly reads them
    const consulted: AssembleFile<unknown>[] = [];
    if (req.adapter.readsConsulted && req.adapter.parseFile) {
      for (const path of [...new Set(located.consulted ?? [])].sort()) {
        const blob = view.blob(path);
        const got = blob ? await reader.read(blob) : undefined;
        if (!blob || got?.kind !== 'text') continue;
        const r = await req.adapter.parseFile({ path, blob, text: got.text }, options);
        if (r.ok) consulted.push({ path, blob, facts: r.facts });
      }
    }
    const input = { files: inputs, missing, ...(req.adapter.readsConsulted ? { consulted } : {}) };
    const session = req.adapter.createSession?.(options);
    const result = session ? await session.assemble(input) : await req.adapter.assemble(input, options);
    diagnostics.push(...result.diagnostics);
    if ('failed' in result) {
      return { commit: info.head, files, tables: [], views: [], hash: '', meaningHash: '', diagnostics, failed: true };
    }
    const store = new SnapshotStore();
    const made = store.fromInput(result.snapshot);
    const m = materialise(made.snapshot, made.origins);
    return { commit: info.head, files, tables: m.tables, views: result.snapshot.views ? made.snapshot.views : [], hash: m.hash, meaningHash: made.snapshot.meaningHash, diagnostics, failed: false };
  } finally {
    reader.close();
  }
}
