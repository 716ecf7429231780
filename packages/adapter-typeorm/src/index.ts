export { typeormAdapter } from './typeorm-adapter.js';
export { assembleTypeorm, TypeormAssembler } from './typeorm-assemble.js';
export { importResolutions, locateTypeorm, TYPEORM_WATCH, sourceGlobs } from './typeorm-locate.js';
export { parseTypeormFile, type TypeormFileFacts } from './typeorm-parse.js';
export { TYPEORM_OPTIONS, readSettings } from './typeorm-config.js';
export { normalizeType, neutralType, driverFamily, DATA_SOURCE_TYPES } from './typeorm-types.js';
export { camelCase, snakeCase, DEFAULT_NAMING, SNAKE_NAMING, namingRules } from './typeorm-naming.js';
export { renderTypeormDemo, renderTypeormStep } from './typeorm-demo.js';
export { typeormAdapter as default } from './typeorm-adapter.js';
