// The API of schema-strata is that of @schema-strata/core; the adapters are found by their short names.
import { registerAdapterBase } from '@schema-strata/core';

registerAdapterBase(import.meta.url);
export * from '@schema-strata/core';
