/**
 * @schema-strata/core: the neutral schema model, the git history engine, the adapter plugin
 * interface, change detection, the interchange file and the CLI.
 */
export type * from './model/types.js';
export { tableId } from './model/types.js';
export { canonicalJson, contentHash, canonicalSnapshot, canonicalOrder, formatType, sameType, enumValues, tableHash } from './model/canonical.js';
export type * from './adapter/api.js';
export { loadAdapter, installedAdapters, registerAdapterBase, KNOWN_ADAPTERS, type LoadedAdapter } from './adapter/loader.js';
export { extractHistory, outputOptions, DEFAULT_MAX_FILE_BYTES, type History, type VersionRecord, type VersionStatus, type ExtractRequest, type FileRef } from './history/engine.js';
export { schemaAt, type SchemaAtCommit } from './history/build-at.js';
export { detectAdapter } from './history/detect.js';
export { defaultCacheDir } from './history/disk-cache.js';
export type { BuiltSnapshot, StoredTable, TableOrigins } from './history/snapshot-store.js';
export { CHANGE_KINDS, type Change, type ChangeKind } from './changes/kinds.js';
export { diffSnapshots } from './changes/diff-snapshots.js';
export { diffTable, formatForeignKey } from './changes/diff-tables.js';
export { toDocument, serialiseDocument, snapshotOfVersion, FORMAT_NAME, FORMAT_VERSION, type InterchangeDocument } from './interchange/document.js';
export { writeFileAtomic } from './util/atomic-write.js';
export { UsageError, EXIT } from './util/errors.js';
export { streamProgress, silentProgress, type Progress } from './util/progress.js';
export { writeRepository, appendCommits, fastImportStream, type ScriptedCommit } from './demo/git-writer.js';
export { demoStory } from './demo/story.js';
export { main } from './cli/main.js';
export { VERSION, GENERATOR } from './version.js';
