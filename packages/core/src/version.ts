import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);
const pkg = require('../package.json') as { version: string };

/** Version of @schema-strata/core (and of the CLI). */
export const VERSION: string = pkg.version;

/** The `generator` of every interchange file. */
export const GENERATOR = Object.freeze({ name: 'schema-strata', version: VERSION });
