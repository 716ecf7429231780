import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { createRequire } from 'node:module';
import { writeRepository } from '@schema-strata/core';

const require = createRequire(import.meta.url);

const bin = fileURLToPath(new URL('../../packages/core/bin/schema-strata.js', import.meta.url));
const dirs: string[] = [];
const tmp = (): string => {
  const d = mkdtempSync(join(tmpdir(), 'strata-typeorm-cli-'));
  dirs.push(d);
  return d;
};
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

interface Doc {
  summary: { versions: number; tableIds: number; changes: number };
  versions: Array<{ snapshot: string; diagnostics: Array<{ code: string }> }>;
  snapshots: Record<string, { tables: string[] }>;
  tables: Record<string, { name: string; columns: Array<{ name: string }> }>;
}

describe('the CLI with the TypeORM adapter', () => {
  it('writes the demo story as TypeORM entities and finds the physical schema the Prisma rendering gives', () => {
    const t = tmp();
    execFileSync(process.execPath, [bin, 'demo', join(t, 'typeorm'), '--adapter', 'typeorm', '--quiet']);
    execFileSync(process.execPath, [bin, 'demo', join(t, 'prisma'), '--adapter', 'prisma', '--quiet']);
    const a = JSON.parse(readFileSync(join(t, 'typeorm', 'history.json'), 'utf8')) as Doc;
    const b = JSON.parse(readFileSync(join(t, 'prisma', 'history.json'), 'utf8')) as Doc;
    expect(a.summary.versions).toBe(b.summary.versions);
    expect(a.summary.tableIds).toBe(b.summary.tableIds);
    const names = (d: Doc): string[] => d.snapshots[d.versions.at(-1)!.snapshot]!.tables.map((h) => d.tables[h]!.name).sort();
    expect(names(a)).toEqual(names(b));
    expect(names(a)).toContain('_TagToTool');
    // the interchange file the TypeORM adapter gives is valid against its JSON Schema (checked by Ajv)
    const Ajv = require('ajv/dist/2020').default as new (o: object) => { compile(s: object): ((d: unknown) => boolean) & { errors?: unknown } };
    const addFormats = require('ajv-formats').default as (a: unknown) => void;
    const ajv = new Ajv({ allErrors: true, strict: false });
    addFormats(ajv);
    const validate = ajv.compile(require('@schema-strata/core/schema/history.schema.json') as object);
    expect(validate(a), JSON.stringify(validate.errors)).toBe(true);
  });

  it('takes --typeorm-naming and repeated --typeorm-decorator flags, and the same options from schema-strata.config.json', async () => {
    const repo = tmp();
    await writeRepository(repo, [{
      date: '2024-03-01T10:00:00+00:00',
      message: 'Tools',
      files: {
        'src/tool.ts': "import { Entity, PrimaryGeneratedColumn } from 'typeorm';\nimport { Code, Label } from './registry';\n\n@Entity()\nexport class ToolItem {\n  @PrimaryGeneratedColumn()\n  toolId: number;\n\n  @Code()\n  shelfCode: string;\n\n  @Label()\n  shortLabel: string;\n}\n",
        'src/registry.ts': 'export const Code = (): PropertyDecorator => () => undefined;\nexport const Label = (): PropertyDecorator => () => undefined;\n',
      },
    }]);
    const out = join(repo, 'out.json');
    const run = (...args: string[]) => spawnSync(process.execPath, [bin, 'extract', repo, '--adapter', 'typeorm', '-o', out, '--quiet', ...args], { encoding: 'utf8' });
    const columns = (): string[] => {
      const d = JSON.parse(readFileSync(out, 'utf8')) as Doc;
      return d.snapshots[d.versions[0]!.snapshot]!.tables.flatMap((h) => d.tables[h]!.columns.map((c) => c.name));
    };
    expect(run('--typeorm-naming', 'snake', '--typeorm-decorator', 'Code=Column', '--typeorm-decorator', 'Label=Column').status).toBe(0);
    expect(columns()).toEqual(['tool_id', 'shelf_code', 'short_label']);
    const config = join(repo, 'options.json');
    writeFileSync(config, JSON.stringify({ options: { 'typeorm-decorator': ['Code=Column'] } }));
    const withConfig = run("--config", config);
    expect(withConfig.stderr).toBe("");
    expect(withConfig.status).toBe(0);
    expect(columns()).toEqual(['toolId', 'shelfCode']);
    const bad = run('--typeorm-naming', 'camel');
    expect(bad.status).not.toBe(0);
    expect(bad.stderr.trim().split('\n')).toHaveLength(1);
  });
});
