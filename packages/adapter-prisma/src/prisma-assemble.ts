import type { Column, Diagnostic, ForeignKey, ReferentialAction, SnapshotInput, UniqueConstraint } from '@schema-strata/core/extract';
import type { Datamodel, DmmfField, DmmfModel } from './prisma-parse.js';
import {
  attributeArgs,
  attributeString,
  dbAttribute,
  fieldLine,
  hasAttribute,
  listArgument,
  type FileScan,
  type ScannedBlock,
  type ScannedField,
} from './prisma-scan.js';
import { defaultText, nativeTypeText, neutralScalarType, type Provider } from './prisma-types.js';

export type JoinKeyRule = 'auto' | 'primary-key' | 'unique';

export interface SchemaContext {
  provider: Provider;
  /** `prisma` when the datasource sets relationMode (or the old referentialIntegrity) to "prisma". */
  relationMode: 'foreignKeys' | 'prisma';
  joinKey: JoinKeyRule;
}

type TableInput = SnapshotInput['tables'][number];

/**
 * Tables of the previous version, by a key that fixes everything their conversion reads: the
 * model's block structure (see `structureOf`), for each type its fields name the structure of
 * that enum or the table name and mapped column names of that model, and the schema context.
 * A model whose key is unchanged is not converted again: the version gets the very table object
 * of the previous one, origins (lines) included. Core keeps a table's origins from the first
 * version of the run that has it (AdapterSession), so lines that moved since are not needed.
 */
export type ModelMemo = Map<string, { table: TableInput; diagnostics: Diagnostic[] }>;

/** What a run's session keeps across versions besides the previous version's tables. */
export interface RunMemo {
  previous: ModelMemo;
  next: ModelMemo;
  /** A small number per distinct block structure of the run. */
  structureIds: Map<string, number>;
  /** The structure number of a scanned block, by its fields list (a moved block shares it). */
  blockStructure: WeakMap<object, number>;
  /** Per structure number: the distinct type names of its fields, sorted. */
  fieldTypes: Map<number, string[]>;
  /** Per structure number of a model: its fields mapped to other column names, as text. */
  mappedFields: Map<number, string>;
  /** A small number per distinct facet (table name and mapped fields) of a referenced model. */
  facetIds: Map<string, number>;
  /** The last scan of each schema file, by path, for the next version's incremental scan. */
  scans: Map<string, FileScan>;
}

/** A fresh memo for a run's session. */
export function runMemo(): RunMemo {
  return { previous: new Map(), next: new Map(), structureIds: new Map(), blockStructure: new WeakMap(), fieldTypes: new Map(), mappedFields: new Map(), facetIds: new Map(), scans: new Map() };
}

const ACTIONS: Record<string, ReferentialAction> = {
  Cascade: 'cascade',
  Restrict: 'restrict',
  NoAction: 'no action',
  SetNull: 'set null',
  SetDefault: 'set default',
};

/** The default onDelete of a required relation: Restrict, or NoAction where the database has no Restrict. */
function requiredOnDelete(ctx: SchemaContext): ReferentialAction {
  return ctx.provider === 'sqlserver' && ctx.relationMode === 'foreignKeys' ? 'no action' : 'restrict';
}

/** The default schema of a provider: a table in it gets no namespace (design: namespace normalised to the default). */
function defaultNamespace(provider: Provider): string | undefined {
  if (provider === 'postgresql' || provider === 'cockroachdb') return 'public';
  if (provider === 'sqlserver') return 'dbo';
  return undefined;
}

function namespaceOf(schema: string | null | undefined, ctx: SchemaContext): string | undefined {
  if (!schema) return undefined;
  return schema === defaultNamespace(ctx.provider) ? undefined : schema;
}

function columnName(f: { name: string; dbName?: string | null }): string {
  return f.dbName ?? f.name;
}

interface ModelInfo {
  model: DmmfModel;
  table: string;
  namespace?: string;
  id: string;
  /** The model's fields by name, built on first use (a model taken from the memo never needs it). */
  fieldsByName?: Map<string, DmmfField>;
  block?: ScannedBlock;
}

function fieldNamed(info: ModelInfo, name: string): DmmfField | undefined {
  info.fieldsByName ??= new Map(info.model.fields.map((f) => [f.name, f]));
  return info.fieldsByName.get(name);
}

function qualified(name: string, namespace?: string): string {
  return namespace ? `${namespace}.${name}` : name;
}

/**
 * What the conversion reads of a block's text: its keyword and name, each field's name, type,
 * modifiers and attribute text, and the block attributes; not the whitespace between them,
 * comments or lines, so that a reformatted or moved block keeps its structure.
 */
function structureOf(b: ScannedBlock): string {
  let out = `${b.keyword} ${b.name}`;
  for (const f of b.fields) out += `\n${f.name} ${f.type}${f.list ? '[]' : ''}${f.optional ? '?' : ''} ${f.attributes}`;
  for (const a of b.blockAttributes) out += `\n${a}`;
  return out;
}

function structureId(memo: RunMemo, b: ScannedBlock): number {
  let n = memo.blockStructure.get(b.fields);
  if (n === undefined) {
    const text = structureOf(b);
    n = memo.structureIds.get(text);
    if (n === undefined) {
      n = memo.structureIds.size;
      memo.structureIds.set(text, n);
    }
    memo.blockStructure.set(b.fields, n);
  }
  return n;
}

/** What a model that refers to this one reads of it: its table name and its fields' column names where mapped. */
function facetId(memo: RunMemo, info: ModelInfo, structure: number | undefined): number {
  let mapped = structure === undefined ? undefined : memo.mappedFields.get(structure);
  if (mapped === undefined) {
    mapped = info.model.fields.filter((f) => f.dbName && f.dbName !== f.name).map((f) => `${f.name}=${f.dbName}`).join(',');
    if (structure !== undefined) memo.mappedFields.set(structure, mapped);
  }
  const facet = `${info.id}|${mapped}`;
  let n = memo.facetIds.get(facet);
  if (n === undefined) {
    n = memo.facetIds.size;
    memo.facetIds.set(facet, n);
  }
  return n;
}

/**
 * Prisma's engine data model (plus the scanned source) to neutral tables. Conventions followed
 * are those of the engine version the adapter ships (see the package README).
 */
export function assembleSchema(
  dm: Datamodel,
  blocks: ScannedBlock[],
  ctx: SchemaContext,
  memo?: RunMemo,
): { snapshot: SnapshotInput; diagnostics: Diagnostic[] } {
  const diagnostics: Diagnostic[] = [];
  const byName = new Map<string, ScannedBlock>();
  for (const b of blocks) if (b.keyword === 'model' || b.keyword === 'view') byName.set(b.name, b);
  const enums = new Map(dm.enums.map((e) => [e.name, e]));

  const models = new Map<string, ModelInfo>();
  const views: NonNullable<SnapshotInput['views']> = [];
  for (const m of dm.models) {
    const block = byName.get(m.name);
    const table = m.dbName ?? m.name;
    const namespace = namespaceOf(m.schema, ctx);
    if (block?.keyword === 'view') {
      views.push({ name: table, ormName: m.name, ...(namespace ? { namespace } : {}), origin: { file: block.file, line: block.line } });
      continue;
    }
    models.set(m.name, { model: m, table, namespace, id: qualified(table, namespace), block });
  }

  const modelNames = new Set([...byName.keys(), ...dm.models.map((m) => m.name)]);
  const tables: TableInput[] = [];
  // each block's structure gets a small number (the same structure, the same number, for the
  // whole run), so that a model's memo key is short
  const blockId = new Map<string, number>();
  if (memo) {
    for (const b of blocks) {
      if (b.keyword === 'model' || b.keyword === 'enum' || b.keyword === 'view' || b.keyword === 'type') blockId.set(b.name, structureId(memo, b));
    }
  }
  // the context, and (to be safe) the datasource and generator blocks as written: a change there
  // converts every model again
  let ctxKey = `${ctx.provider}|${ctx.relationMode}|${ctx.joinKey}`;
  for (const b of blocks) if (b.keyword === 'datasource' || b.keyword === 'generator') ctxKey += `|${b.text}`;
  for (const info of models.values()) {
    if (!memo || !info.block) {
      tables.push(modelTable(info, models, modelNames, enums, ctx, diagnostics));
      continue;
    }
    const own = blockId.get(info.model.name)!;
    let types = memo.fieldTypes.get(own);
    if (!types) {
      types = [...new Set(info.block.fields.map((f) => f.type))].filter((t) => t !== info.model.name).sort();
      memo.fieldTypes.set(own, types);
    }
    let key = `${ctxKey}|${info.block.file}|${own}|`;
    for (const t of types) {
      // a model it refers to: only its facet; an enum, view or type: its structure (an enum the
      // scan did not find: the engine's account of it)
      const target = models.get(t);
      const n = blockId.get(t);
      if (target) key += `${t}=m${facetId(memo, target, n)},`;
      else if (n !== undefined) key += `${t}=s${n},`;
      else if (enums.has(t)) key += `${t}=e${JSON.stringify(enums.get(t))},`;
    }
    let hit = memo.previous.get(key) ?? memo.next.get(key);
    if (!hit) {
      const ds: Diagnostic[] = [];
      const made = modelTable(info, models, modelNames, enums, ctx, ds);
      made.contentKey = key;
      hit = { table: made, diagnostics: ds };
    }
    memo.next.set(key, hit);
    if (hit.diagnostics.length > 0) diagnostics.push(...hit.diagnostics);
    tables.push(hit.table);
  }
  tables.push(...implicitJoinTables(models, ctx));
  tables.push(...ignoredModels(blocks, dm, modelNames, enums, ctx, diagnostics));
  return { snapshot: { tables, views }, diagnostics };
}

function scalarColumn(
  f: DmmfField,
  ctx: SchemaContext,
  enums: Map<string, Datamodel['enums'][number]>,
  scanned?: ScannedField,
  block?: ScannedBlock,
): Column {
  const name = columnName(f);
  let type;
  if (f.kind === 'enum') {
    const e = enums.get(f.type);
    type = { kind: 'enum' as const, name: e?.dbName ?? f.type, values: (e?.values ?? []).map((v) => v.dbName ?? v.name) };
  } else {
    type = neutralScalarType(f.type, f.nativeType, ctx.provider);
  }
  if (f.isList) type = { kind: 'array' as const, of: type };
  const col: Column = {
    name,
    type,
    nativeType: nativeTypeText(f.type, f.isList, f.nativeType),
    // Scalar lists are nullable array columns in the database (the engine writes no NOT NULL for them).
    nullable: f.isList ? true : !f.isRequired,
  };
  if (name !== f.name) col.ormName = f.name;
  // an enum default names a value as the schema does; the database holds its mapped name
  const e = f.kind === 'enum' ? enums.get(f.type) : undefined;
  const dbValue = (v: unknown): unknown => (typeof v === 'string' ? e?.values.find((x) => x.name === v)?.dbName ?? v : v);
  const raw = e ? (Array.isArray(f.default) ? f.default.map(dbValue) : dbValue(f.default)) : f.default;
  const def = defaultText(raw, f.kind);
  if (def !== undefined) col.default = def;
  const dname = (f.default as { name?: string } | undefined)?.name;
  if (dname === 'autoincrement' || dname === 'sequence') col.generated = 'autoincrement';
  if (scanned && block) col.origin = { file: block.file, line: fieldLine(block, scanned) };
  return col;
}

function modelTable(
  info: ModelInfo,
  models: Map<string, ModelInfo>,
  modelNames: Set<string>,
  enums: Map<string, Datamodel['enums'][number]>,
  ctx: SchemaContext,
  diagnostics: Diagnostic[],
): TableInput {
  const { model, block } = info;
  const scannedFields = new Map((block?.fields ?? []).map((f) => [f.name, f]));
  const columns: Column[] = [];
  const uniques: UniqueConstraint[] = [];
  const fks: ForeignKey[] = [];
  // Walk fields in source order when the scan has them, so that columns keep declaration order,
  // including the ones the engine's data model leaves out (@ignore, Unsupported).
  const order: Array<{ dmmf?: DmmfField; scanned?: ScannedField }> = [];
  if (block) {
    for (const sf of block.fields) order.push({ dmmf: fieldNamed(info, sf.name), scanned: sf });
    for (const f of model.fields) if (!scannedFields.has(f.name)) order.push({ dmmf: f });
  } else {
    for (const f of model.fields) order.push({ dmmf: f });
  }
  for (const { dmmf, scanned } of order) {
    if (dmmf) {
      if (dmmf.kind === 'object') continue;
      const col = scalarColumn(dmmf, ctx, enums, scanned, block);
      columns.push(col);
      // the engine's data model leaves `isUnique` unset on an `@id @unique` field, whose column still gets a unique index
      if (dmmf.isUnique || (scanned && hasAttribute(scanned.attributes, '@unique'))) uniques.push({ columns: [col.name] });
      continue;
    }
    if (scanned) {
      const col = scannedColumn(scanned, ctx, enums, block!, modelNames);
      if (col) {
        columns.push(col);
        if (hasAttribute(scanned.attributes, '@unique')) uniques.push({ columns: [col.name] });
      }
    }
  }
  const dbCol = (field: string): string => {
    const f = fieldNamed(info, field);
    if (f) return columnName(f);
    const sf = scannedFields.get(field);
    return (sf && attributeString(sf.attributes, '@map')) ?? field;
  };
  let primaryKey: string[] = [];
  if (model.primaryKey) primaryKey = model.primaryKey.fields.map(dbCol);
  else primaryKey = model.fields.filter((f) => f.isId).map(columnName);
  for (const u of model.uniqueIndexes) {
    const cols = u.fields.map(dbCol);
    uniques.push(u.name ? { name: u.name, columns: cols } : { columns: cols });
  }

  for (const f of model.fields) {
    if (f.kind !== 'object' || !f.relationFromFields || f.relationFromFields.length === 0) continue;
    const target = models.get(f.type);
    if (!target) {
      diagnostics.push({
        severity: 'warning', code: 'prisma/relation-to-view',
        message: `relation ${model.name}.${f.name} points at ${f.type}, which is not a table; no foreign key recorded`,
        ...(block ? { file: block.file } : {}),
      });
      continue;
    }
    const cols = f.relationFromFields.map(dbCol);
    const refCols = (f.relationToFields ?? []).map((n) => {
      const tf = fieldNamed(target, n);
      return tf ? columnName(tf) : n;
    });
    // the engine's "referential arity": required when any referencing field is required, else the
    // relation field's own arity (prisma-engines, psl: RelationFieldWalker::referential_arity)
    const required = f.relationFromFields.some((n) => fieldNamed(info, n)?.isRequired === true) || f.isRequired;
    const fk: ForeignKey = {
      columns: cols,
      referencedTable: target.id,
      referencedColumns: refCols,
      // Defaults when the schema states none (Prisma docs, "Referential actions", "Referential
      // action defaults"): onDelete Restrict for required relations and SetNull for optional ones;
      // onUpdate Cascade. Where the database has no Restrict (SQL Server with foreign keys; same
      // page, support table) the engine uses NoAction instead (psl: default_on_delete_action).
      onDelete: f.relationOnDelete ? ACTIONS[f.relationOnDelete] ?? 'no action' : required ? requiredOnDelete(ctx) : 'set null',
      onUpdate: f.relationOnUpdate ? ACTIONS[f.relationOnUpdate] ?? 'no action' : 'cascade',
      enforcement: ctx.relationMode === 'prisma' ? 'orm' : 'database',
    };
    // the constraint name, when the relation sets `map:` (the engine's data model does not carry it)
    const sf = scannedFields.get(f.name);
    const constraintName = sf ? /\bmap\s*:\s*"([^"]+)"/.exec(attributeArgs(sf.attributes, '@relation') ?? '')?.[1] : undefined;
    if (constraintName) fk.name = constraintName;
    fks.push(fk);
  }

  const t: TableInput = {
    name: info.table,
    ormName: model.name,
    kind: 'table',
    columns,
    primaryKey,
    foreignKeys: fks,
    uniques: distinctUniques(uniques),
  };
  if (info.namespace) t.namespace = info.namespace;
  if (block) t.origin = { file: block.file, line: block.line };
  return t;
}

/**
 * One unique constraint per column list: the engine's data model reports a one-field
 * `@@unique([x])` both as the field's `isUnique` and as a unique index, and the database gets one
 * index. A name given to either is kept.
 */
function distinctUniques(uniques: UniqueConstraint[]): UniqueConstraint[] {
  const byColumns = new Map<string, UniqueConstraint>();
  for (const u of uniques) {
    const key = u.columns.join('\u0000');
    const seen = byColumns.get(key);
    if (!seen) byColumns.set(key, u);
    else if (!seen.name && u.name) byColumns.set(key, { ...seen, name: u.name });
  }
  return [...byColumns.values()];
}

/** A column the engine's data model leaves out (`@ignore`, `Unsupported(...)`), from the source text. */
function scannedColumn(
  sf: ScannedField,
  ctx: SchemaContext,
  enums: Map<string, Datamodel['enums'][number]>,
  block: ScannedBlock,
  modelNames: Set<string>,
): Column | undefined {
  if (modelNames.has(sf.type)) return undefined; // a relation field, not a column
  const name = attributeString(sf.attributes, '@map') ?? sf.name;
  const db = dbAttribute(sf.attributes);
  let type;
  let nativeType: string;
  const unsupported = /^Unsupported\("((?:[^"\\]|\\.)*)"\)$/.exec(sf.type);
  if (unsupported) {
    type = { kind: 'other' as const, raw: unsupported[1]! };
    nativeType = sf.type + (sf.list ? '[]' : '');
  } else if (enums.has(sf.type)) {
    const e = enums.get(sf.type)!;
    type = { kind: 'enum' as const, name: e.dbName ?? e.name, values: e.values.map((v) => v.dbName ?? v.name) };
    nativeType = sf.type;
  } else {
    const native: [string, string[]] | null = db ? [db.name, db.args] : null;
    type = neutralScalarType(sf.type, native, ctx.provider);
    nativeType = nativeTypeText(sf.type, sf.list, native);
  }
  if (sf.list) type = { kind: 'array' as const, of: type };
  const col: Column = { name, type, nativeType, nullable: sf.list ? true : sf.optional, origin: { file: block.file, line: fieldLine(block, sf) } };
  if (name !== sf.name) col.ormName = sf.name;
  const def = attributeArgs(sf.attributes, '@default');
  if (def !== undefined) col.default = def.trim();
  if (def && /^\s*autoincrement\(\)/.test(def)) col.generated = 'autoincrement';
  return col;
}

/**
 * Implicit many-to-many relations become the join table Prisma creates (Prisma docs,
 * "Many-to-many relations", conventions for relation tables in implicit m-n relations): named
 * `_` + relation name; column `A` references the model whose name comes first in alphabetical
 * order, `B` the other; both foreign keys cascade. The key follows the engine this adapter ships:
 * a primary key (A, B) on PostgreSQL (Prisma 6 and later; Prisma docs, "Upgrade to Prisma ORM 6":
 * the change applies to PostgreSQL only), a unique index (A, B) elsewhere, CockroachDB included;
 * plus an index on B.
 */
function implicitJoinTables(models: Map<string, ModelInfo>, ctx: SchemaContext): TableInput[] {
  const relations = new Map<string, Array<{ model: ModelInfo; field: DmmfField }>>();
  for (const info of models.values()) {
    for (const f of info.model.fields) {
      if (f.kind !== 'object' || !f.isList || !f.relationName) continue;
      if (f.relationFromFields && f.relationFromFields.length > 0) continue;
      const target = models.get(f.type);
      if (!target) continue;
      const back = target.model.fields.find(
        (g) => g.kind === 'object' && g.relationName === f.relationName && g.type === info.model.name && (g !== f || target === info),
      );
      if (!back || !back.isList) continue;
      const list = relations.get(f.relationName) ?? [];
      list.push({ model: info, field: f });
      relations.set(f.relationName, list);
    }
  }
  const out: TableInput[] = [];
  for (const [relationName, sides] of [...relations.entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
    const names = [...new Set(sides.map((s) => s.model.model.name))].sort();
    const a = models.get(names[0]!)!;
    const b = models.get(names[names.length - 1]!)!;
    const idOf = (m: ModelInfo): DmmfField | undefined => m.model.fields.find((f) => f.isId);
    const ia = idOf(a);
    const ib = idOf(b);
    if (!ia || !ib) continue;
    const colOf = (name: string, f: DmmfField): Column => ({
      name,
      type: neutralScalarType(f.type, f.nativeType, ctx.provider),
      nativeType: nativeTypeText(f.type, false, f.nativeType),
      nullable: false,
    });
    const pkRule = ctx.joinKey === 'auto' ? (ctx.provider === 'postgresql' ? 'primary-key' : 'unique') : ctx.joinKey;
    const enforcement = ctx.relationMode === 'prisma' ? 'orm' : 'database';
    const t: TableInput = {
      name: `_${relationName}`,
      ormName: relationName,
      kind: 'implicit-join',
      columns: [colOf('A', ia), colOf('B', ib)],
      primaryKey: pkRule === 'primary-key' ? ['A', 'B'] : [],
      uniques: pkRule === 'unique' ? [{ columns: ['A', 'B'] }] : [],
      foreignKeys: [
        { columns: ['A'], referencedTable: a.id, referencedColumns: [columnName(ia)], onDelete: 'cascade', onUpdate: 'cascade', enforcement },
        { columns: ['B'], referencedTable: b.id, referencedColumns: [columnName(ib)], onDelete: 'cascade', onUpdate: 'cascade', enforcement },
      ],
    };
    if (a.namespace) t.namespace = a.namespace;
    const origin = sides[0]!.model.block;
    const field = origin?.fields.find((f) => f.name === sides[0]!.field.name);
    if (origin) t.origin = { file: origin.file, line: field ? fieldLine(origin, field) : origin.line };
    out.push(t);
  }
  return out;
}

/** Models marked `@@ignore` are left out of the engine's data model but are tables in the database. */
function ignoredModels(
  blocks: ScannedBlock[],
  dm: Datamodel,
  modelNames: Set<string>,
  enums: Map<string, Datamodel['enums'][number]>,
  ctx: SchemaContext,
  diagnostics: Diagnostic[],
): TableInput[] {
  const known = new Set(dm.models.map((m) => m.name));
  const out: TableInput[] = [];
  for (const b of blocks) {
    if (b.keyword !== 'model' || known.has(b.name)) continue;
    if (!b.blockAttributes.some((a) => /^@@ignore\b/.test(a))) continue;
    const mapped = b.blockAttributes.map((a) => (a.startsWith('@@map') ? attributeString(a, '@@map') : undefined)).find(Boolean);
    const schema = b.blockAttributes.map((a) => (a.startsWith('@@schema') ? attributeString(a, '@@schema') : undefined)).find(Boolean);
    const namespace = namespaceOf(schema, ctx);
    const columns: Column[] = [];
    const uniques: UniqueConstraint[] = [];
    let primaryKey: string[] = [];
    for (const sf of b.fields) {
      const col = scannedColumn(sf, ctx, enums, b, modelNames);
      if (!col) continue;
      columns.push(col);
      if (hasAttribute(sf.attributes, '@id')) primaryKey.push(col.name);
      if (hasAttribute(sf.attributes, '@unique')) uniques.push({ columns: [col.name] });
    }
    const nameOf = (field: string): string => columns.find((c) => (c.ormName ?? c.name) === field)?.name ?? field;
    for (const a of b.blockAttributes) {
      if (a.startsWith('@@id')) primaryKey = listArgument(a).map(nameOf);
      if (a.startsWith('@@unique')) uniques.push({ columns: listArgument(a).map(nameOf) });
    }
    diagnostics.push({
      severity: 'info', code: 'prisma/ignored-model', file: b.file, line: b.line,
      message: `model ${b.name} is marked @@ignore: its table is read from the source text (no foreign keys)`,
    });
    const t: TableInput = { name: mapped ?? b.name, ormName: b.name, kind: 'table', columns, primaryKey, foreignKeys: [], uniques: distinctUniques(uniques), origin: { file: b.file, line: b.line } };
    if (namespace) t.namespace = namespace;
    out.push(t);
  }
  return out;
}

/** Read provider and relation mode from the scanned datasource block. */
export function datasourceInfo(blocks: ScannedBlock[]): { provider?: string; relationMode: 'foreignKeys' | 'prisma'; line?: number; file?: string } {
  const ds = blocks.find((b) => b.keyword === 'datasource');
  if (!ds) return { relationMode: 'foreignKeys' };
  const unquote = (s: string | undefined): string | undefined => (s === undefined ? undefined : /^"(.*)"$/.exec(s.trim())?.[1] ?? s.trim());
  const provider = unquote(ds.properties.get('provider')?.value);
  const mode = unquote(ds.properties.get('relationMode')?.value ?? ds.properties.get('referentialIntegrity')?.value);
  return { provider, relationMode: mode === 'prisma' ? 'prisma' : 'foreignKeys', line: ds.line, file: ds.file };
}

