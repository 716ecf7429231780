// Facts are kept for a whole run, one per distinct blob: they must not keep the blob's text
// alive. Names a parser takes from a text are slices of it in V8, and a slice keeps its whole
// parent string; the adapters hand back copies (core's `detach`). Checked by the heap: parse
// texts of 8 MB in all, keep only the facts, collect the garbage, and see how much stays.
import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';
import { describe, expect, it } from 'vitest';
import typeorm from '@schema-strata/adapter-typeorm';
import knex from '@schema-strata/adapter-knex';
import { detach } from '@schema-strata/core';

setFlagsFromString('--expose-gc');
const gc = runInNewContext('gc') as () => void;

/** A text of about `size` characters: a TypeORM entity or a Knex migration, then a long comment. */
function text(kind: 'typeorm' | 'knex', i: number, size: number): string {
  const body =
    kind === 'typeorm'
      ? `import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\nimport { Shelf } from './shelf_with_a_long_name_${i}';\n\n@Entity('tool_with_a_long_table_name_${i}')\nexport class ToolWithALongClassName${i} {\n  @PrimaryGeneratedColumn()\n  identifierOfTheTool: number;\n\n  @Column({ name: 'label_of_the_tool_${i}', length: 120 })\n  labelOfTheTool: string;\n}\n`
      : `import { shelfTableNameConstant } from './constants_with_a_long_name_${i}';\nexports.up = async (knex) => {\n  await knex.schema.createTable('tool_with_a_long_table_name_${i}', (t) => {\n    t.increments('identifier_of_the_tool');\n    t.string('label_of_the_tool_${i}', 120).notNullable();\n  });\n};\nexports.down = () => {};\n`;
  // (a unique filler, so that no two texts share anything)
  return body + `/* ${String(i).repeat(Math.ceil(size / String(i).length)).slice(0, size)} */\n`;
}

/** Heap growth (bytes) from keeping the facts of `n` texts of `size` characters each. */
async function retained(parse: (path: string, t: string) => unknown, kind: 'typeorm' | 'knex', n: number, size: number): Promise<number> {
  // (a first parse loads the TypeScript parser, which is not what is measured)
  await parse('src/warm.ts', text(kind, -1, 10));
  gc();
  const before = process.memoryUsage().heapUsed;
  const kept: unknown[] = [];
  for (let i = 0; i < n; i++) kept.push(await parse(`src/tool_${i}.ts`, text(kind, i, size)));
  gc();
  const after = process.memoryUsage().heapUsed;
  expect(kept.length).toBe(n);
  return after - before;
}

describe('facts do not keep the texts they were parsed from', () => {
  const n = 40;
  const size = 200_000;
  const texts = n * size;

  it('TypeORM: the parse', async () => {
    const grew = await retained((path, t) => typeorm.parseFile!({ path, blob: path, text: t }, {}), 'typeorm', n, size);
    // the facts of 40 small entities are a few hundred kilobytes at most; the texts are 8 MB
    expect(grew).toBeLessThan(texts / 4);
  });

  it('Knex: the parse', async () => {
    const grew = await retained((path, t) => knex.parseFile!({ path, blob: path, text: t }, {}), 'knex', n, size);
    expect(grew).toBeLessThan(texts / 4);
  });

  it('detach copies plain data, and slices of a text kept without it do keep the text (the check above can fail)', async () => {
    expect(detach({ a: ['x', 1, null, { b: true }] })).toEqual({ a: ['x', 1, null, { b: true }] });
    expect(detach(undefined)).toBeUndefined();
    // as a JSON round trip: undefined properties dropped, undefined in a list null
    const data = { a: undefined, b: [undefined, 'a name of more than thirteen characters'], c: { d: undefined, e: 2 } };
    expect(detach(data)).toStrictEqual(JSON.parse(JSON.stringify(data)));
    const grew = await retained((_p, t) => t.slice(10, 60), 'knex', n, size);
    expect(grew).toBeGreaterThan(texts / 2);
    const copied = await retained((_p, t) => detach(t.slice(10, 60)), 'knex', n, size);
    expect(copied).toBeLessThan(texts / 4);
  });
});
