export * from '@schema-strata/core';
