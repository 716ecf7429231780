import type { AdapterOption } from '@schema-strata/core/extract';

/** Options of the Prisma adapter (shown by `schema-strata extract --help`). */
export const PRISMA_OPTIONS: readonly AdapterOption[] = Object.freeze([
  {
    flag: 'prisma-join-key',
    description:
      'key of implicit many-to-many join tables: auto (as the shipped engine: primary key on PostgreSQL, unique index elsewhere), primary-key, or unique (as Prisma 5 and older on every database)',
    type: 'string',
    choices: ['auto', 'primary-key', 'unique'],
    default: 'auto',
  },
]);
