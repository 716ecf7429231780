export { prismaAdapter, assemblePrisma } from './prisma-adapter.js';
export { locatePrisma, schemaFromConfig, schemaFromPackageJson, PRISMA_WATCH } from './prisma-locate.js';
export { modernise, parseWithEngine, engineDiagnostics, engineVersion, unknownPreviewFeatures, type ModerniseOptions } from './prisma-parse.js';
export { scanSchema } from './prisma-scan.js';
export { neutralScalarType } from './prisma-types.js';
export { prismaAdapter as default } from './prisma-adapter.js';
