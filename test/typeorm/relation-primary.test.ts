import { fileURLToPath } from 'node:url';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';
import { compareWithOracle, oracle } from './oracle.js';
import { readFixture, runAdapter } from './harness.js';

// TypeORM 0.2 let a relation be part of the primary key (`@ManyToOne(() => Member, { primary: true })`):
// its join columns were primary, and never nullable (0.2's RelationMetadata:
// `isNullable = options.nullable === false || isPrimary ? false : true`). TypeORM 0.3 removed the
// option (its RelationMetadata keeps the line as a comment; its changelog asks for an explicit
// primary column that is also the join column). Histories written for 0.2 keep the option for
// years. An object literal with `primary` does not compile against 0.3's RelationOptions (checked
// here with TypeScript against TypeORM 0.3's declarations), so the adapter reads an uncast one as
// 0.2 did, and ignores a cast one (`{ primary: true } as never`) as 0.3 does (the corpus has one).
// The check: the 0.2 form gives the tables that TypeORM 0.3's own metadata builder derives from the
// 0.3 form the changelog prescribes.
describe("TypeORM 0.2's primary relations", () => {
  // the members and tools both forms relate to
  const shared = readFixture('relation-primary/shared');
  const v02 = { ...shared, ...readFixture('relation-primary/v02') };
  const v03 = { ...shared, ...readFixture('relation-primary/v03') };

  it("do not type-check against TypeORM 0.3's declarations", () => {
    // in-memory sources placed in this folder, so that `typeorm` resolves to the test workspace's;
    // 2769: no overload of the decorator accepts the options
    const dir = fileURLToPath(new URL('./', import.meta.url));
    const files = new Map(Object.entries(v02).map(([p, t]) => [dir + '__v02__/' + p, t]));
    const options: ts.CompilerOptions = { target: ts.ScriptTarget.ES2021, module: ts.ModuleKind.CommonJS, moduleResolution: ts.ModuleResolutionKind.Node10, experimentalDecorators: true, emitDecoratorMetadata: true, strict: false, skipLibCheck: true, noEmit: true };
    const host = ts.createCompilerHost(options, true);
    const get = host.getSourceFile.bind(host);
    host.getSourceFile = (name, lang, onError, create) => (files.has(name) ? ts.createSourceFile(name, files.get(name)!, lang, true) : get(name, lang, onError, create));
    const exists = host.fileExists.bind(host);
    host.fileExists = (name) => files.has(name) || exists(name);
    const read = host.readFile.bind(host);
    host.readFile = (name) => files.get(name) ?? read(name);
    const isDir = host.directoryExists!.bind(host);
    host.directoryExists = (d) => [...files.keys()].some((k) => k.startsWith(d.replace(/\/?$/, '/'))) || isDir(d);
    const program = ts.createProgram({ rootNames: [...files.keys()], options, host });
    const errors = ts.getPreEmitDiagnostics(program).map((d) => [d.code, d.file?.fileName.slice(dir.length + '__v02__/'.length), ts.flattenDiagnosticMessageText(d.messageText, ' ')] as const);
    expect(errors.map(([code, file]) => [code, file]).sort()).toEqual([[2769, 'src/member-card.entity.ts'], [2769, 'src/tool-keeper.entity.ts'], [2769, 'src/tool-keeper.entity.ts']]);
    for (const [, , message] of errors) expect(message).toMatch(/'primary' does not exist in type 'RelationOptions'/);
  });

  it('are the primary key, as TypeORM 0.3 builds the explicit form', async () => {
    const ours = await runAdapter(v02);
    expect(ours.diagnostics).toEqual([]);
    const theirs = await oracle(v03);
    expect(compareWithOracle(ours.snapshot!, theirs)).toEqual([]);
    const keeper = ours.snapshot!.tables.find((t) => t.name === 'tool_keeper')!;
    expect(keeper.primaryKey).toEqual(['keeperId', 'toolCode']);
    // `nullable: true` does not hold for a primary relation
    expect(keeper.columns.find((c) => c.name === 'toolCode')!.nullable).toBe(false);
    const card = ours.snapshot!.tables.find((t) => t.name === 'member_card')!;
    expect(card.primaryKey).toEqual(['holder']);
    // a one-to-one whose join column is the whole primary key gets no unique constraint of its own
    expect(card.uniques).toEqual([]);
  });

  it('cast so as to compile against TypeORM 0.3, are ignored as 0.3 ignores them', async () => {
    const cast = Object.fromEntries(Object.entries(v02).map(([p, t]) => [p, t.replace(/(\{[^{}]*primary: true[^{}]*\})/g, '$1 as never')]));
    expect(cast['src/tool-keeper.entity.ts']).toContain('as never');
    const ours = await runAdapter(cast);
    expect(ours.snapshot!.tables.find((t) => t.name === 'tool_keeper')!.primaryKey).toEqual([]);
    expect(ours.diagnostics.filter((d) => d.code === 'typeorm/no-primary-column').map((d) => d.file).sort()).toEqual(['src/member-card.entity.ts', 'src/tool-keeper.entity.ts']);
  });

  it('referenced before their join columns are built: the relation is left out, with a diagnostic', async () => {
    const note = "import { Column, Entity, ManyToOne, PrimaryGeneratedColumn } from 'typeorm';\nimport { ToolKeeper } from './tool-keeper.entity';\n\n@Entity()\nexport class KeeperNote {\n  @PrimaryGeneratedColumn()\n  id: number;\n\n  @ManyToOne(() => ToolKeeper)\n  about: ToolKeeper;\n\n  @Column('text')\n  body: string;\n}\n";
    const ours = await runAdapter({ ...v02, 'src/keeper-note.entity.ts': note });
    expect(ours.diagnostics.map((d) => [d.code, d.file, d.line])).toEqual([['typeorm/relation-key-not-built', 'src/keeper-note.entity.ts', 10]]);
    expect(ours.snapshot!.tables.find((t) => t.name === 'keeper_note')!.foreignKeys).toEqual([]);
  });
});
