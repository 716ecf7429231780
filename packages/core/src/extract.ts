/**
 * @schema-strata/core/extract: what a program needs to extract a schema history and what an
 * adapter needs to plug in (the neutral model, the adapter interface and its helpers, the
 * history engine, change detection and the interchange file), without the analysis, the
 * writers, the report, studies and the CLI, so that it loads fast: a re-run after one more
 * commit is mostly start-up. The package root re-exports all of it.
 */
export type * from './model/types.js';
export { tableId, withPrecision } from './model/types.js';
export { canonicalJson, contentHash, canonicalSnapshot, canonicalOrder, formatType, sameType, enumValues, tableHash } from './model/canonical.js';
export type * from './adapter/api.js';
export { BlobMemo } from './adapter/blob-memo.js';
export { readAssumptions, type AssumedValue } from './adapter/assumptions.js';
export { detach } from './adapter/detach.js';
export { isOwnPackageJson, packageJsonDir } from './adapter/package-json.js';
export { sortedIndex, sortedUnique } from './util/sorted.js';
export { loadAdapter, installedAdapters, registerAdapterBase, KNOWN_ADAPTERS, type LoadedAdapter } from './adapter/loader.js';
export { extractHistory, outputOptions, DEFAULT_MAX_FILE_BYTES, type History, type VersionRecord, type VersionStatus, type ExtractRequest, type FileRef } from './history/engine.js';
export { schemaAt, type SchemaAtCommit } from './history/build-at.js';
export { detectAdapter } from './history/detect.js';
export { defaultCacheDir } from './history/disk-cache.js';
export type { BuiltSnapshot, StoredTable, TableOrigins } from './history/snapshot-store.js';
export { CHANGE_KINDS, type Change, type ChangeKind } from './changes/kinds.js';
export { diffSnapshots } from './changes/diff-snapshots.js';
export { diffTable, formatForeignKey } from './changes/diff-tables.js';
export { toDocument, serialiseDocument, snapshotOfVersion, filesOfVersion, type DocumentVersion, FORMAT_NAME, FORMAT_VERSION, type InterchangeDocument } from './interchange/document.js';
export { writeFileAtomic } from './util/atomic-write.js';
export { UsageError, EXIT } from './util/errors.js';
export { streamProgress, silentProgress, type Progress } from './util/progress.js';
export { VERSION, GENERATOR } from './version.js';
export { tuneV8, V8_FLAGS } from './util/v8-tuning.js';
