export { knexAdapter } from './knex-adapter.js';
export { assembleKnex, KnexSession, planVersion, naturalCompare, type PlanEntry, type VersionPlan } from './knex-assemble.js';
export { KNEX_OPTIONS, knexOptions, type KnexOptions } from './knex-config.js';
export { renderKnexDemo, renderKnexStep } from './knex-demo.js';
export type { KnexFacts, PackageInfo, Val, Stmt, FnIR, Chain, Call, Cond, Arg, Root, Param, FnRef, ExportEntry } from './knex-facts.js';
export {
  locateKnex, knexfileSettings, knexfileEnvironments, migrationsIn, resolveImport, resolvePackageSpec, scanImports, isKnexfile,
  KNEX_WATCH, DEFAULT_LOAD_EXTENSIONS, type KnexfileSettings,
} from './knex-locate.js';
export { parseKnexSource, parseKnexFile, packageInfo, runtimeImportsOf } from './knex-parse.js';
export { columnType, sqlType, dialectOf, DIALECTS, knexClient, KNEX_CLIENT_NAMES, type Dialect, type ColumnTypeInfo, type KnexClientInfo } from './knex-types.js';
export { ADAPTER_VERSION } from './version.js';
export { knexAdapter as default } from './knex-adapter.js';
