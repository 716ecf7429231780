import { readAssumptions, type AdapterOption, type AdapterOptionValues, type AssumedValue, type Diagnostic } from '@schema-strata/core/extract';
import { dialectOf, DIALECTS, KNEX_CLIENT_NAMES, type Dialect } from './knex-types.js';

/** Values of --knex-client besides auto: the type families, then the other client names Knex accepts. */
const CLIENT_CHOICES = [...DIALECTS, ...KNEX_CLIENT_NAMES.filter((c) => !(DIALECTS as readonly string[]).includes(c))];

/** Options of the Knex adapter (shown by `schema-strata extract --help`; also settable in schema-strata.config.json `options`). */
export const KNEX_OPTIONS: readonly AdapterOption[] = Object.freeze([
  {
    flag: 'knex-init',
    description:
      'a base-schema setup file (builder calls outside the migrations: its up(), its default-exported function, or its top-level statements), replayed before the migrations; repeat for several, in order',
    type: 'string[]',
  },
  {
    flag: 'knex-order',
    description:
      'order of the migrations: name (as Knex sorts them: by file name across all migration directories) or natural (digit runs compared as numbers, for projects whose own migration source sorts that way)',
    type: 'string',
    choices: ['name', 'natural'],
    default: 'name',
  },
  {
    flag: 'knex-environment',
    description: 'knexfile environment whose migration settings and client are read (default: production, else development, else the first)',
    type: 'string',
  },
  {
    flag: 'knex-client',
    description: `database client the run is for, as a knexfile's client names it (${CLIENT_CHOICES.join(', ')}): the column types follow its family, and conditions on knex.client (dialect, driverName, config.client) are decided by it; default: the knexfile's client (types follow postgresql when there is none, and such conditions take their first branch)`,
    type: 'string',
    choices: ['auto', ...CLIENT_CHOICES],
    default: 'auto',
  },
  {
    flag: 'knex-assume',
    description:
      "NAME=VALUE: a value the migrations or the knexfile read from something the project never declares (an environment variable, an application's global settings object), as the replay's diagnostics name it (process.env.DB_CLIENT=pg, APP.config.db.type=postgres), so that conditions and switches on it take the branch that value takes and the knexfile's client and directories that read it are known; VALUE is a JSON number, true, false, null or a quoted string, else the text as it stands (always the text under process.env, as Node gives it); repeat for several",
    type: 'string[]',
  },
  {
    flag: 'knex-schema',
    description:
      "database schema that unqualified table names resolve to, as the connection's searchPath sets it (its first schema): tables in it get no namespace, so that code moving between withSchema(NAME) and unqualified names keeps their ids; default: the first schema of the knexfile's searchPath (PostgreSQL), else the client's own (public, dbo, main)",
    type: 'string',
  },
]);

export interface KnexOptions {
  init: string[];
  order: 'name' | 'natural';
  environment?: string;
  /** The family the column types follow (from --knex-client). */
  client?: Dialect;
  /** The client name --knex-client gives, as a knexfile would (decides conditions on `knex.client`). */
  clientName?: string;
  /** The schema unqualified names resolve to (--knex-schema), when not the client's default. */
  schema?: string;
  /** Values of reads from undeclared names (--knex-assume), by dotted path. */
  assume: ReadonlyMap<string, AssumedValue>;
  /** Malformed option values, reported with every version. */
  diagnostics: Diagnostic[];
}

export type { AssumedValue };

/** The adapter's options from the values core passes (CLI flags or the configuration file). */
export function knexOptions(values: AdapterOptionValues): KnexOptions {
  const init = values['knex-init'];
  const order = values['knex-order'];
  const env = values['knex-environment'];
  const client = values['knex-client'];
  const schema = values['knex-schema'];
  const { values: assume, diagnostics } = readAssumptions(values['knex-assume'], 'knex-assume', 'knex/bad-assume-option');
  return {
    assume,
    diagnostics,
    init: Array.isArray(init) ? init : typeof init === 'string' && init ? [init] : [],
    order: order === 'natural' ? 'natural' : 'name',
    ...(typeof env === 'string' && env ? { environment: env } : {}),
    ...(typeof client === 'string' && CLIENT_CHOICES.includes(client) ? { client: dialectOf(client)!, clientName: client } : {}),
    ...(typeof schema === 'string' && schema ? { schema } : {}),
  };
}
