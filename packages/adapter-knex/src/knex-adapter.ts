import type { AdapterOptionValues, SchemaAdapter, SourceFile } from '@schema-strata/core/extract';
import { assembleKnex, KnexSession } from './knex-assemble.js';
import { KNEX_OPTIONS, knexOptions } from './knex-config.js';
import { renderKnexDemo } from './knex-demo.js';
import type { KnexFacts } from './knex-facts.js';
import { KNEX_WATCH, locateKnex } from './knex-locate.js';
import { parseKnexFile } from './knex-parse.js';
import { ADAPTER_VERSION } from './version.js';

/**
 * The Knex adapter: finds the migrations as Knex's CLI would (the knexfile's migration
 * directories, read as a syntax tree), parses every migration once with the TypeScript parser
 * (ts-morph) into plain facts, and replays the builder calls of `up()` in Knex's order, without
 * running any code of the project. Raw SQL is counted and reported, never interpreted.
 *
 * @example
 * ```ts
 * import { extractHistory } from '@schema-strata/core/extract';
 * import knex from '@schema-strata/adapter-knex';
 *
 * const history = await extractHistory({ repo: '.', adapter: knex, adapterOptions: { 'knex-init': ['db/base.js'] } });
 * console.log(history.versions.length, 'versions');
 * ```
 */
export const knexAdapter: SchemaAdapter<KnexFacts> = Object.freeze({
  name: 'knex',
  version: ADAPTER_VERSION,
  description: 'Knex migrations (knexfile directories, JS and TS, CommonJS and ESM), replayed statically from their syntax trees',
  options: KNEX_OPTIONS,
  watch: KNEX_WATCH,
  locate: locateKnex,
  parseFile: (file: SourceFile) => parseKnexFile(file),
  // the assembly resolves imports of the repository's own packages by their package.json files
  readsConsulted: true,
  assemble: assembleKnex,
  createSession: (options: AdapterOptionValues) => new KnexSession(knexOptions(options)),
  renderDemo: renderKnexDemo,
});
