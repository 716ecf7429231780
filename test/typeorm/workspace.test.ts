import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { appendCommits, extractHistory, serialiseDocument, toDocument, GENERATOR, type History, type ScriptedCommit } from '@schema-strata/core';
import { typeormAdapter } from '@schema-strata/adapter-typeorm';
import { compareWithOracle } from './oracle.js';
import { readFixture, runAdapter, writeWithTrees } from './harness.js';
import { buildWorkspace } from './workspace-build.js';

// A monorepo whose entities import from other packages of the same repository by their package
// names: `@coop/common` (entry `types: lib/index.d.ts`, its tsconfig's outDir `lib` and rootDir
// `src`; a string enum, the base class of every entity, the members entity, and a subpath into its
// compiled output, `@coop/common/lib/condition`; the enum behind a second barrel, src/domain/index.ts,
// since a re-export is no step of the locate step's two), `@coop/catalog` (entry `main: dist/index.js`, no
// outDir in its tsconfig.json: the tools entity, a relation target) and `@coop/lending` (loans,
// reservations, repairs and the data source). The oracle: the workspace linked and built package
// by package with TypeScript, loaded by Node's own module resolution, and TypeORM 0.3's metadata
// of what it exports (workspace-build.ts).
const workspace = readFixture('workspace');
const BUILD_ORDER = ['packages/common', 'packages/catalog', 'packages/lending'];

describe('imports from other packages of the same repository', () => {
  it("give TypeORM's tables of the workspace as its own build resolves them", async () => {
    const theirs = await buildWorkspace(workspace, BUILD_ORDER);
    // every sibling import resolved and type-checked in the oracle's build
    expect(theirs.errors).toEqual([]);
    expect(theirs.result.tables.map((t) => t.name).sort()).toEqual(['loans', 'members', 'repairs', 'reservations', 'tools']);
    const ours = await runAdapter(workspace);
    expect(ours.diagnostics).toEqual([]);
    expect(compareWithOracle(ours.snapshot!, theirs.result, theirs.ds)).toEqual([]);
    // the string enum of the sibling package, typed by TypeScript's metadata: character varying
    const loans = ours.snapshot!.tables.find((t) => t.name === 'loans')!;
    expect(loans.columns.find((c) => c.name === 'state')!.nativeType).toBe('String');
    expect(loans.columns.find((c) => c.name === 'stage')!.type).toMatchObject({ kind: 'enum', values: ['requested', 'out', 'returned'] });
  });

  it("are the version's files: the sibling's sources and tsconfig, its package.json consulted", async () => {
    const { located } = await runAdapter(workspace);
    expect(located.files).toEqual(expect.arrayContaining([
      'packages/common/src/domain/loan-state.ts', 'packages/common/src/condition.ts', 'packages/common/src/audited.ts',
      'packages/common/src/member.entity.ts', 'packages/common/tsconfig.json', 'packages/catalog/src/tool.entity.ts',
    ]));
    expect(located.files.some((p) => p.endsWith('package.json'))).toBe(false);
    // (core hands the assembly their facts: the adapter reads the consulted files, readsConsulted)
    expect(located.consulted).toEqual(expect.arrayContaining(['packages/common/package.json', 'packages/catalog/package.json']));
  });

  it('map an entry of dist/src/ back to src/ when the tsconfig has an outDir and no rootDir (a build with --rootDir ./)', async () => {
    const options = JSON.parse(workspace['packages/lending/tsconfig.json']!) as { compilerOptions: Record<string, unknown> };
    const { outDir: _o, rootDir: _r, ...common } = options.compilerOptions;
    const files: Record<string, string> = {
      'package.json': workspace['package.json']!,
      'packages/fees/package.json': JSON.stringify({ name: '@coop/fees', main: 'dist/src/index.js', types: 'dist/src/index.d.ts' }),
      'packages/fees/tsconfig.json': JSON.stringify({ compilerOptions: { ...common, declaration: true, outDir: 'dist' }, include: ['src'] }),
      'packages/fees/tsconfig.build.json': JSON.stringify({ extends: './tsconfig.json', compilerOptions: { rootDir: '.' } }),
      'packages/fees/src/index.ts': "export * from './fee-kind';\n",
      'packages/fees/src/fee-kind.ts': "export enum FeeKind {\n  Late = 'late',\n  Damage = 'damage',\n}\n",
      'packages/desk/package.json': JSON.stringify({ name: '@coop/desk', dependencies: { '@coop/fees': 'workspace:*' } }),
      'packages/desk/tsconfig.json': workspace['packages/lending/tsconfig.json']!,
      'packages/desk/src/fee.entity.ts': "import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\nimport { FeeKind } from '@coop/fees';\n\n@Entity('fees')\nexport class Fee {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column()\n  kind: FeeKind;\n}\n",
    };
    const theirs = await buildWorkspace(files, ['packages/fees', 'packages/desk']);
    expect(theirs.errors).toEqual([]);
    const ours = await runAdapter(files);
    expect(ours.diagnostics).toEqual([]);
    expect(ours.located.files).toContain('packages/fees/src/fee-kind.ts');
    expect(compareWithOracle(ours.snapshot!, theirs.result, theirs.ds)).toEqual([]);
  });

  it('stay outside code when no package of the repository has the name', async () => {
    const renamed = { ...workspace, 'packages/common/package.json': workspace['packages/common/package.json']!.replace('"@coop/common"', '"@coop/shared"') };
    const ours = await runAdapter(renamed);
    expect(ours.located.files).not.toContain('packages/common/src/domain/loan-state.ts');
    expect(ours.diagnostics.map((d) => d.code)).toContain('typeorm/type-unresolved');
  });
});

// A history of the same workspace: a release bump of the sibling's package.json (consulted only:
// no version), then two commits that edit only the sibling package's enum (a value added; the
// enum made numeric, so that TypeScript's metadata of the column typed by it becomes Number), and
// a commit outside the schema. Every version is checked against the oracle's build of its tree.
describe('a history that edits only the sibling package', () => {
  const STATE = 'packages/common/src/domain/loan-state.ts';
  const PKG = 'packages/common/package.json';
  const steps: Array<{ message: string; files: Record<string, string | null> }> = [
    { message: 'Workspace of the cooperative: common, catalog and lending packages', files: workspace },
    { message: 'Release common 1.3.0', files: { [PKG]: workspace[PKG]!.replace('"1.2.0"', '"1.3.0"') } },
    { message: 'Loans can be lost', files: { [STATE]: workspace[STATE]!.replace("  Returned = 'returned',\n", "  Returned = 'returned',\n  Lost = 'lost',\n") } },
    { message: 'Loan states as numbers', files: { [STATE]: '/** Where a loan of a tool stands. */\nexport enum LoanState {\n  Requested = 1,\n  Out = 2,\n  Returned = 3,\n  Lost = 4,\n}\n' } },
    { message: 'Notes for the volunteers', files: { 'NOTES.md': 'Opening hours: Saturdays 10-14.\n' } },
  ];
  let dir: string;
  let history: History;
  let trees: Map<string, Record<string, string>>;

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'strata-typeorm-workspace-'));
    const commits: ScriptedCommit[] = steps.map((s, i) => ({ date: `2024-03-${String(2 + i).padStart(2, '0')}T18:00:00+00:00`, message: s.message, files: s.files }));
    ({ trees } = await writeWithTrees(dir, commits));
    history = await extractHistory({ repo: dir, adapter: typeormAdapter });
  }, 60_000);

  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('makes a version of each enum edit, none of the release bump or the notes', () => {
    expect(history.versions.map((v) => v.subject)).toEqual(['Workspace of the cooperative: common, catalog and lending packages', 'Loans can be lost', 'Loan states as numbers']);
    expect(history.diagnostics).toEqual([]);
  });

  it('records the enum values and then the column type changing with the sibling enum', () => {
    const at = (i: number) => history.changes.filter((c) => c.version === i).map((c) => `${c.kind} ${c.table}.${c.column}`).sort();
    expect(at(1)).toEqual(['column-enum-values-changed loans.stage']);
    expect(at(2)).toEqual(['column-default-changed loans.stage', 'column-enum-values-changed loans.stage', 'column-type-changed loans.state']);
    const retyped = history.changes.find((c) => c.version === 2 && c.kind === 'column-type-changed')!;
    expect([retyped.before, retyped.after]).toEqual(['string', 'integer']);
  });

  it('gives a re-run with the disk cache, after a commit that uses the sibling again, the bytes of a run without it', async () => {
    const cacheDir = mkdtempSync(join(tmpdir(), 'strata-typeorm-workspace-cache-'));
    try {
      const bytes = async (cached: boolean) => serialiseDocument(toDocument(await extractHistory({ repo: dir, adapter: typeormAdapter, ...(cached ? { cacheDir } : {}) }), GENERATOR));
      expect(await bytes(true)).toBe(await bytes(false));
      // a new entity of the lending package typed by the sibling's enum: located after the resumed walk
      const repairs = 'packages/lending/src/opening-hours.entity.ts';
      await appendCommits(dir, [{
        date: '2024-03-20T18:00:00+00:00', message: 'Checks on returned tools',
        files: { [repairs]: "import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';\n\n@Entity('opening_hours')\nexport class OpeningHours {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @Column()\n  weekday: number;\n}\n" },
      }]);
      const rerun = await bytes(true);
      expect(rerun).toBe(await bytes(false));
      // a window first: the versions before it have no unit in the cache, and are built later from the resumed walk
      const windowCache = mkdtempSync(join(tmpdir(), 'strata-typeorm-workspace-cache-'));
      try {
        const since = history.versions[1]!.commit;
        await extractHistory({ repo: dir, adapter: typeormAdapter, cacheDir: windowCache, since });
        const whole = serialiseDocument(toDocument(await extractHistory({ repo: dir, adapter: typeormAdapter, cacheDir: windowCache }), GENERATOR));
        expect(whole).toBe(await bytes(false));
      } finally {
        rmSync(windowCache, { recursive: true, force: true });
      }
    } finally {
      rmSync(cacheDir, { recursive: true, force: true });
    }
  }, 60_000);

  it("agrees with TypeORM's metadata of the built workspace at every version", async () => {
    for (const v of history.versions) {
      const theirs = await buildWorkspace(trees.get(v.commit)!, BUILD_ORDER);
      expect(theirs.errors).toEqual([]);
      const tables = history.snapshots.get(v.snapshot!)!.tables.map((t) => t.table);
      expect(compareWithOracle({ tables }, theirs.result, theirs.ds), `version ${v.index}`).toEqual([]);
    }
  }, 60_000);
});
