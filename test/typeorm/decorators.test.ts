import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { camelCase, DEFAULT_NAMING, renderTypeormDemo, SNAKE_NAMING, snakeCase } from '@schema-strata/adapter-typeorm';
import { demoStory } from '@schema-strata/core';
import { compareWithOracle, compile, load, oracle, oracleTables, typeormMetadata } from './oracle.js';
import { runAdapter } from './harness.js';

const require = createRequire(import.meta.url);

describe('naming rules', () => {
  // reference: TypeORM's own StringUtils, DefaultNamingStrategy and the community SnakeNamingStrategy
  const strings = require('typeorm/util/StringUtils') as { camelCase(s: string): string; snakeCase(s: string): string };
  const { DefaultNamingStrategy } = require('typeorm') as { DefaultNamingStrategy: new () => Record<string, (...a: unknown[]) => string> };
  const { SnakeNamingStrategy } = require('typeorm-naming-strategies') as { SnakeNamingStrategy: new () => Record<string, (...a: unknown[]) => string> };
  const words = ['ToolLoan', 'HTMLPage', 'member_id', 'repairCostEUR', 'V2Tool', 'x', 'shelf-slot', 'already_snake', 'ABC'];

  it("are TypeORM's case conversions", () => {
    for (const w of words) {
      expect(camelCase(w)).toBe(strings.camelCase(w));
      expect(snakeCase(w)).toBe(strings.snakeCase(w));
    }
  });

  it("are the default and snake strategies' names", () => {
    for (const [ours, theirs] of [[DEFAULT_NAMING, new DefaultNamingStrategy()], [SNAKE_NAMING, new SnakeNamingStrategy()]] as const) {
      for (const w of words) {
        expect(ours.tableName(w, undefined)).toBe(theirs.tableName!(w, undefined));
        expect(ours.columnName(w, undefined, ['homeAddress', 'geo'])).toBe(theirs.columnName!(w, undefined, ['homeAddress', 'geo']));
        expect(ours.columnName(w, 'given_name', [])).toBe(theirs.columnName!(w, 'given_name', []));
        expect(ours.joinColumnName(w, 'id')).toBe(theirs.joinColumnName!(w, 'id'));
        expect(ours.joinTableName('tool', 'tag_list', w, '')).toBe(theirs.joinTableName!('tool', 'tag_list', w, ''));
        expect(ours.joinTableColumnName('tool_kit', w)).toBe(theirs.joinTableColumnName!('tool_kit', w));
        expect(ours.joinTableInverseColumnName('tool_kit', w, 'id')).toBe(theirs.joinTableInverseColumnName!('tool_kit', w, 'id'));
      }
    }
  });
});

describe("TypeScript's intrinsic string types", () => {
  // Named on a property, `Lowercase<string>` and its kin are recorded as Object (TypeORM refuses
  // it); through a type alias they are recorded as String. Checked by compiling with TypeScript and
  // letting TypeORM read the metadata.
  const tsconfig = JSON.stringify({ compilerOptions: { strict: true, experimentalDecorators: true, emitDecoratorMetadata: true } });
  const head = "import { Column, Entity, PrimaryColumn } from 'typeorm';\n";
  const aliased = {
    'tsconfig.json': tsconfig,
    'src/names.ts': "export type ToolCode = Uppercase<string>;\nexport type Handle = Lowercase<string>;\nexport type Label = Capitalize<string>;\nexport type Slug = Uncapitalize<'Drill'>;\nexport type MemberHandle = Handle;\n",
    'src/tool.ts': head + "import type { Handle, Label, MemberHandle, Slug, ToolCode } from './names';\n@Entity()\nexport class Tool {\n  @PrimaryColumn()\n  code: ToolCode;\n\n  @Column()\n  keeper: Handle;\n\n  @Column()\n  label: Label;\n\n  @Column()\n  slug: Slug;\n\n  @Column()\n  owner: MemberHandle;\n}\n",
  };

  it('through a type alias are strings, as TypeORM sees them', async () => {
    const r = await runAdapter(aliased);
    expect(r.diagnostics).toEqual([]);
    expect(compareWithOracle(r.snapshot!, await oracle(aliased, { strict: true }))).toEqual([]);
    expect(r.snapshot!.tables[0]!.columns.map((c) => c.nativeType)).toEqual(['String', 'String', 'String', 'String', 'String']);
  });

  it('named on the property are Object, which TypeORM refuses', async () => {
    const direct = { 'tsconfig.json': tsconfig, 'src/tool.ts': head + "@Entity()\nexport class Tool {\n  @PrimaryColumn()\n  code: string;\n\n  @Column()\n  keeper: Lowercase<string>;\n}\n" };
    await expect(oracle(direct, { strict: true })).rejects.toThrow(/Data type "Object" in "Tool.keeper" is not supported/);
    const r = await runAdapter(direct);
    expect(r.diagnostics.map((d) => [d.code, d.line])).toEqual([['typeorm/unsupported-type', 8]]);
  });
});

describe("types TypeScript's metadata gives, under the project's strictNullChecks", () => {
  const files = (strict: boolean): Record<string, string> => ({
    'tsconfig.json': JSON.stringify({ compilerOptions: { strict, experimentalDecorators: true, emitDecoratorMetadata: true } }),
    'src/member.ts': "import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\n@Entity()\nexport class Member {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column({ nullable: true })\n  nickname: string | null;\n\n  @Column()\n  joined: Date | undefined;\n}\n",
  });

  it('without strictNullChecks `string | null` is a string, as TypeORM sees it', async () => {
    const r = await runAdapter(files(false));
    const theirs = await oracle(files(false), { strict: false });
    expect(compareWithOracle(r.snapshot!, theirs)).toEqual([]);
    expect(r.diagnostics).toEqual([]);
  });

  it('with strictNullChecks TypeScript records Object, which TypeORM refuses: a diagnostic and the non-null type', async () => {
    await expect(oracle(files(true), { strict: true })).rejects.toThrow(/Data type "Object".*not supported/);
    const r = await runAdapter(files(true));
    const codes = r.diagnostics.filter((d) => d.code === 'typeorm/strict-null-union');
    expect(codes.map((d) => d.line).sort((a, b) => a! - b!)).toEqual([8, 11]);
    const cols = r.snapshot!.tables[0]!.columns;
    expect(cols.find((c) => c.name === 'nickname')!.type).toEqual({ kind: 'string' });
    expect(cols.find((c) => c.name === 'joined')!.type).toEqual({ kind: 'timestamp', withZone: false });
  });
});

describe("a project's own decorators", () => {
  const base = {
    'src/decorators/registry.ts': "export const pending: Array<{ target: object; key: string | symbol; kind: string }> = [];\n",
    'src/decorators/entity-id.ts': "import { pending } from './registry';\n\n/** Registers the property; the project applies TypeORM's decorator at start-up. */\nexport function EntityId(): PropertyDecorator {\n  return (target, key) => {\n    pending.push({ target, key, kind: 'id' });\n  };\n}\n",
    'src/tool.ts': "import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\nimport { EntityId } from './decorators/entity-id';\nimport { Trimmed } from 'some-validation-package';\n\n@Entity()\nexport class Tool {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @EntityId()\n  code: string;\n\n  @Trimmed()\n  @Column({ length: 40 })\n  name: string;\n}\n",
  };

  it('a decorator that only registers the property is reported, with the flag that says what it stands for', async () => {
    const r = await runAdapter(base);
    const d = r.diagnostics.find((x) => x.code === 'typeorm/unresolved-decorator')!;
    expect(d.file).toBe('src/tool.ts');
    expect(d.line).toBe(10);
    expect(d.message).toContain('--typeorm-decorator EntityId=Column');
    expect(r.snapshot!.tables[0]!.columns.map((c) => c.name)).toEqual(['id', 'name']);
    // decorators of other packages are not TypeORM's and are not reported
    expect(r.diagnostics.filter((x) => x.message.includes('Trimmed'))).toEqual([]);
  });

  it('--typeorm-decorator NAME=TYPEORM_DECORATOR passes its arguments to that decorator', async () => {
    const r = await runAdapter(base, { 'typeorm-decorator': ['EntityId=Column'] });
    expect(r.diagnostics.filter((x) => x.code === 'typeorm/unresolved-decorator')).toEqual([]);
    const code = r.snapshot!.tables[0]!.columns.find((c) => c.name === 'code')!;
    expect(code.type).toEqual({ kind: 'string' });
    const bad = await runAdapter(base, { 'typeorm-decorator': ['EntityId'] });
    expect(bad.diagnostics.map((x) => x.code)).toContain('typeorm/bad-decorator-option');
  });

  it('a project class decorator beside @Entity says nothing; on a class that is no entity it is reported', async () => {
    const files = {
      'src/use-dto.ts': "export function UseDto(dto: new () => object): ClassDecorator {\n  return (ctor) => {\n    (ctor.prototype as { dtoClass?: unknown }).dtoClass = dto;\n  };\n}\n",
      'src/tool.ts': "import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\nimport { UseDto } from './use-dto';\n\nclass ToolDto {}\n\n@UseDto(ToolDto)\nexport abstract class Lendable {\n  @PrimaryGeneratedColumn()\n  id: number;\n}\n\n@Entity()\n@UseDto(ToolDto)\nexport class Tool extends Lendable {\n  @Column()\n  name: string;\n}\n",
    };
    const r = await runAdapter(files);
    expect(r.snapshot!.tables.map((t) => [t.name, t.columns.map((c) => c.name)])).toEqual([['tool', ['id', 'name']]]);
    expect(compareWithOracle(r.snapshot!, await oracle(files, { strict: false }))).toEqual([]);
    const found = r.diagnostics.filter((x) => x.code === 'typeorm/unresolved-decorator');
    expect(found.map((x) => [x.file, x.line])).toEqual([['src/tool.ts', 6]]);
    expect(found[0]!.message).toContain('--typeorm-decorator UseDto=Entity');
  });

  it('an entity decorator of the project can be declared too', async () => {
    const files = {
      'src/model.ts': "import { Column, PrimaryGeneratedColumn } from 'typeorm';\nimport { Model } from './model-registry';\n\n@Model('workshops')\nexport class Workshop {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column()\n  name: string;\n}\n",
      'src/model-registry.ts': "export const Model = (_name: string): ClassDecorator => () => undefined;\n",
    };
    const none = await runAdapter(files);
    expect(none.located.files).toEqual([]);
    const r = await runAdapter(files, { 'typeorm-decorator': ['Model=Entity'] });
    expect(r.snapshot!.tables.map((t) => t.name)).toEqual(['workshops']);
  });
});

describe('the demo story written as TypeORM entities', () => {
  it('is read by TypeORM as the adapter reads it, at every step that compiles', async () => {
    const story = demoStory();
    const steps = renderTypeormDemo(story);
    let checked = 0;
    for (let i = 0; i < steps.length; i++) {
      if (story.steps[i]!.variant === 'broken') continue;
      const files = Object.fromEntries(Object.entries(steps[i]!.files).filter((e): e is [string, string] => e[1] !== null));
      const o = { strict: true };
      const ds = await typeormMetadata(load(compile(files, o), o), o);
      const r = await runAdapter(files);
      expect(compareWithOracle(r.snapshot!, oracleTables(ds), ds), `step ${i}`).toEqual([]);
      checked++;
    }
    expect(checked).toBe(story.steps.length - 1);
    const last = Object.fromEntries(Object.entries(steps[steps.length - 1]!.files).filter((e): e is [string, string] => e[1] !== null));
    const join = (await runAdapter(last)).snapshot!.tables.find((t) => t.name === '_TagToTool')!;
    expect(join.columns.map((c) => c.name)).toEqual(['A', 'B']);
    expect(join.kind).toBe('implicit-join');
  }, 120_000);
});
