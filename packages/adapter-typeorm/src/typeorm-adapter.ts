import type { AdapterOptionValues, FileFacts, SchemaAdapter, SourceFile } from '@schema-strata/core/extract';
import { assembleTypeorm, TypeormAssembler } from './typeorm-assemble.js';
import { TYPEORM_OPTIONS } from './typeorm-config.js';
import { renderTypeormDemo } from './typeorm-demo.js';
import { locateTypeorm, TYPEORM_WATCH } from './typeorm-locate.js';
import { parseTypeormFile, type TypeormFileFacts } from './typeorm-parse.js';
import { ADAPTER_VERSION } from './version.js';

/** Facts of one file (depends on the text alone; options do not change them). */
function parseFile(file: SourceFile, _options: AdapterOptionValues): FileFacts<TypeormFileFacts> {
  return parseTypeormFile(file);
}

/**
 * The TypeORM adapter: rebuilds, without compiling or running the project, the tables TypeORM
 * would derive from the project's entity classes (and EntitySchema definitions), from their
 * syntax trees (TypeScript's parser as ts-morph ships it).
 *
 * @example
 * ```ts
 * import { extractHistory } from '@schema-strata/core/extract';
 * import typeorm from '@schema-strata/adapter-typeorm';
 *
 * const history = await extractHistory({ repo: '.', adapter: typeorm, adapterOptions: { 'typeorm-naming': 'snake' } });
 * console.log(history.versions.length, 'versions');
 * ```
 */
export const typeormAdapter: SchemaAdapter<TypeormFileFacts> = Object.freeze({
  name: 'typeorm',
  version: ADAPTER_VERSION,
  description: 'TypeORM entity classes and EntitySchema definitions, read statically from their syntax trees',
  options: TYPEORM_OPTIONS,
  watch: TYPEORM_WATCH,
  locate: locateTypeorm,
  parseFile,
  assemble: assembleTypeorm,
  createSession: (options: AdapterOptionValues) => new TypeormAssembler(options),
  // the assembly resolves imports of the repository's own packages from their package.json
  readsConsulted: true,
  renderDemo: renderTypeormDemo,
});
