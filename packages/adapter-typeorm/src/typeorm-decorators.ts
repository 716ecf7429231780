import type { Origin } from '@schema-strata/core/extract';
import { ENTITY_DECORATORS, type TypeormSettings } from './typeorm-config.js';
import {
  enumValuesOf, get, isArrE, isDecoE, isFnE, isObjE, isSymE, isUnk, numOf, str, symName, textOf,
  type DecoE, type DesignResult, type E, type Project, type Sym,
} from './typeorm-evaluate.js';
import type { ClassFact, DecoratorUse, PropertyFact, SchemaFact } from './typeorm-parse.js';
import type { ColumnTypeRef } from './typeorm-types.js';

/**
 * TypeORM's decorators (and EntitySchema options) read into metadata arguments, the way each of
 * TypeORM's decorator functions normalises its parameters before it records them. One set of
 * arguments per class or schema, in the order the decorators would run.
 */

export type ColumnMode = 'regular' | 'createDate' | 'updateDate' | 'deleteDate' | 'version' | 'treeLevel' | 'objectId' | 'virtual-property';

export interface ColumnOpts {
  type?: ColumnTypeRef;
  name?: string;
  length?: string;
  precision?: number | null;
  scale?: number;
  nullable?: boolean;
  /** Present when the option was given (its value may be undefined). */
  default?: { v: E };
  primary?: boolean;
  enum?: Array<string | number>;
  enumName?: string;
  array?: boolean;
  asExpression?: boolean;
}

export interface ColumnArgs {
  target: string;
  propertyName: string;
  mode: ColumnMode;
  options: ColumnOpts;
  origin: Origin;
  /** How the type was inferred, when it came from TypeScript's metadata. */
  design?: DesignResult;
}

export type RelationType = 'many-to-one' | 'one-to-one' | 'one-to-many' | 'many-to-many';

export interface RelationArgs {
  target: string;
  propertyName: string;
  relationType: RelationType;
  /** The target: a function returning a class, a class, or an entity name. */
  type: E;
  inverseSide?: E;
  nullable?: boolean;
  /** TypeORM 0.2's `primary` relation option (removed in 0.3): the join columns are primary columns. */
  primary?: boolean;
  onDelete?: string;
  onUpdate?: string;
  createForeignKeyConstraints: boolean;
  isTreeParent?: boolean;
  origin: Origin;
  /** Class owning the decorator when the relation is the tree parent (its own class). */
  selfTarget?: Sym;
}

export interface JoinColumnOpts {
  name?: string;
  referencedColumnName?: string;
  foreignKeyConstraintName?: string;
}

export interface JoinColumnArgs extends JoinColumnOpts {
  target: string;
  propertyName: string;
}

export interface JoinTableArgs {
  target: string;
  propertyName: string;
  name?: string;
  joinColumns?: JoinColumnOpts[];
  inverseJoinColumns?: JoinColumnOpts[];
  schema?: string;
  database?: string;
}

export interface EmbeddedArgs {
  target: string;
  propertyName: string;
  type: E;
  prefix?: string | boolean;
  isArray: boolean;
  origin: Origin;
}

export interface UniqueArgs {
  target: string;
  name?: string;
  /** Property names, or a function of the properties map. */
  columns: E;
  origin: Origin;
  /** Unique index with a WHERE clause (partial): not a unique constraint over every row. */
  partial?: boolean;
}

export interface ForeignKeyArgs {
  target: string;
  propertyName?: string;
  type: E;
  inverseSide?: E;
  columnNames?: string[];
  referencedColumnNames?: string[];
  name?: string;
  onDelete?: string;
  onUpdate?: string;
  origin: Origin;
}

export interface TableArgs {
  target: string;
  type: 'regular' | 'view' | 'entity-child';
  name?: string;
  schema?: string;
  database?: string;
  origin: Origin;
}

/** Everything one class (or schema) declares. */
export interface TargetArgs {
  key: string;
  /** Class or schema name (TypeORM's target name). */
  name: string;
  file: string;
  cls?: ClassFact;
  schema?: SchemaFact;
  tables: TableArgs[];
  columns: ColumnArgs[];
  relations: RelationArgs[];
  joinColumns: JoinColumnArgs[];
  joinTables: JoinTableArgs[];
  embeddeds: EmbeddedArgs[];
  generations: Array<{ propertyName: string; strategy: string }>;
  uniques: UniqueArgs[];
  foreignKeys: ForeignKeyArgs[];
  inheritance?: { pattern: string; column?: ColumnOpts & { name?: string } };
  discriminatorValue?: E;
  tree?: { type: string; closureTableName?: string; options?: E };
  /** Set when the class uses MongoDB's ObjectIdColumn. */
  mongo?: boolean;
  /** For EntitySchema targets: the base schema or class, by name. */
  extendsName?: string;
}

export const classKey = (file: string, name: string): string => `${file}#${name}`;
export const schemaKey = (name: string): string => `schema:${name}`;

function newArgs(key: string, name: string, file: string): TargetArgs {
  return { key, name, file, tables: [], columns: [], relations: [], joinColumns: [], joinTables: [], embeddeds: [], generations: [], uniques: [], foreignKeys: [] };
}

/** Reads one decorated class or schema, reporting what it cannot read statically. */
export class DecoratorReader {
  constructor(
    private readonly project: Project,
    private readonly settings: TypeormSettings,
  ) {}

  private notLiteral(file: string, line: number, what: string, e: E): void {
    this.project.report(`nl\u0000${file}\u0000${line}\u0000${what}`, {
      severity: 'warning', code: 'typeorm/not-literal', file, line,
      message: `${what} is not a value that can be read without running the code (${textOf(e)}); TypeORM's default is used`,
    });
  }

  /** A string option, or undefined (with a diagnostic when it was given but cannot be read). */
  private s(o: E, key: string, file: string, line: number, what: string): string | undefined {
    const v = get(o, key);
    if (v === undefined || v === null) return undefined;
    if (typeof v === 'string') return v;
    if (typeof v === 'number') return String(v);
    this.notLiteral(file, line, `${what} option ${key}`, v);
    return undefined;
  }

  private b(o: E, key: string, file: string, line: number, what: string): boolean | undefined {
    const v = get(o, key);
    if (v === undefined) return undefined;
    if (typeof v === 'boolean') return v;
    if (v === null || v === 0 || v === '') return false;
    if (isUnk(v)) {
      this.notLiteral(file, line, `${what} option ${key}`, v);
      return undefined;
    }
    return true;
  }

  private n(o: E, key: string, file: string, line: number, what: string): number | undefined {
    const v = get(o, key);
    if (v === undefined || v === null) return undefined;
    const n = numOf(v);
    if (n === undefined) this.notLiteral(file, line, `${what} option ${key}`, v);
    return n;
  }

  /** Column options as TypeORM's ColumnMetadata reads them. */
  columnOptions(o: E, file: string, line: number, what: string): ColumnOpts {
    const out: ColumnOpts = {};
    if (!isObjE(o)) return out;
    if (o.open) this.notLiteral(file, line, `${what} options`, { $: 'unk', t: `...${o.open}` });
    const t = get(o, 'type');
    if (t !== undefined) {
      const ref = this.typeRef(t);
      if (ref !== undefined) out.type = ref;
      else this.notLiteral(file, line, `${what} option type`, t);
    }
    const name = this.s(o, 'name', file, line, what);
    if (name) out.name = name;
    const length = get(o, 'length');
    if (length !== undefined && length !== null && length !== '' && length !== 0) {
      if (typeof length === 'number' || typeof length === 'string') out.length = String(length);
      else this.notLiteral(file, line, `${what} option length`, length);
    }
    const precision = get(o, 'precision');
    if (precision === null) out.precision = null;
    else if (precision !== undefined) {
      const p = numOf(precision);
      if (p !== undefined) out.precision = p;
      else this.notLiteral(file, line, `${what} option precision`, precision);
    }
    const scale = this.n(o, 'scale', file, line, what);
    if (scale !== undefined) out.scale = scale;
    const nullable = this.b(o, 'nullable', file, line, what);
    if (nullable !== undefined) out.nullable = nullable;
    if (isObjE(o) && o.p.has('default')) out.default = { v: o.p.get('default') };
    const primary = this.b(o, 'primary', file, line, what);
    if (primary) out.primary = true;
    const en = get(o, 'enum');
    if (en !== undefined && en !== null) {
      const values = enumValuesOf(en);
      if (values) out.enum = values;
      else this.notLiteral(file, line, `${what} option enum`, en);
    }
    const enumName = this.s(o, 'enumName', file, line, what);
    if (enumName) out.enumName = enumName;
    const array = this.b(o, 'array', file, line, what);
    if (array) out.array = true;
    if (get(o, 'asExpression') !== undefined) out.asExpression = true;
    return out;
  }

  /** A column type given as an option: a type name, or a constructor (`String`, `Number`, a class). */
  typeRef(t: E): ColumnTypeRef | undefined {
    if (typeof t === 'string') return t;
    if (isSymE(t)) {
      if (t.s.k === 'global') return { ctor: t.s.name };
      if (t.s.k === 'class') return { ctor: `class:${t.s.c.name}` };
    }
    return undefined;
  }

  // ---- decorator uses

  /**
   * The TypeORM decorators a list of written decorators stands for, in the order TypeScript
   * applies them (the last written first), and the ones that could not be followed.
   */
  resolveUses(uses: readonly DecoratorUse[], file: string): { decos: DecoE[]; unresolved: Array<{ use: DecoratorUse; why: string }> } {
    const decos: DecoE[] = [];
    const unresolved: Array<{ use: DecoratorUse; why: string }> = [];
    for (let i = uses.length - 1; i >= 0; i--) {
      const use = uses[i]!;
      const callee = this.project.dotted(file, use.n);
      const env = { file, frames: [], depth: 0 };
      const args = use.args.map((a) => this.project.eval(a, env));
      const isTypeorm = isSymE(callee) && (callee.s.k === 'typeorm' || callee.s.k === 'typeormNs');
      const last = use.n.slice(use.n.lastIndexOf('.') + 1);
      const mapped = isTypeorm ? undefined : this.settings.decorators.get(use.n) ?? this.settings.decorators.get(last);
      if (mapped) {
        if (mapped !== 'IGNORE') decos.push({ $: 'deco', name: mapped, args, via: use.n });
        continue;
      }
      let result: E;
      if (use.call) result = this.project.call(callee, args, env);
      else if (isSymE(callee) && callee.s.k === 'func') result = this.project.expand(callee.s.f, callee.s.file, [], 0);
      else result = callee;
      if (isDecoE(result)) {
        decos.push(result);
        continue;
      }
      if (typeof result === 'object' && result !== null && result.$ === 'decos' && result.list.length > 0) {
        // a custom decorator's TypeORM decorators run in the order it calls them
        decos.push(...result.list);
        continue;
      }
      const s = isSymE(callee) ? callee.s : undefined;
      if (!s) {
        unresolved.push({ use, why: 'its definition could not be followed' });
        continue;
      }
      if (s.k === 'missing') unresolved.push({ use, why: `it is imported from ${s.spec}, which is not in the tree (${s.path})` });
      else if (s.k === 'func' || s.k === 'const') unresolved.push({ use, why: `its definition (${s.file}) does not call a TypeORM decorator that can be followed statically` });
      else if (s.k === 'unknown') unresolved.push({ use, why: 'its definition is not found' });
      // decorators of other packages (validation, serialisation, GraphQL...) are not TypeORM's: ignored
    }
    return { decos, unresolved };
  }

  private unresolvedDiagnostic(className: string, prop: string, file: string, u: { use: DecoratorUse; why: string }): void {
    const name = u.use.n;
    this.project.report(`ud\u0000${file}\u0000${u.use.line}\u0000${name}`, {
      severity: 'warning', code: 'typeorm/unresolved-decorator', file, line: u.use.line,
      message: `@${name} on ${className}.${prop} does not resolve to a TypeORM decorator (${u.why}); the property is left out. If it stands for one, say so: --typeorm-decorator ${name}=Column (or another TypeORM decorator)`,
    });
  }

  /** The metadata arguments of one class. */
  readClass(file: string, cls: ClassFact, strict: boolean): TargetArgs {
    const key = classKey(file, cls.name);
    const args = newArgs(key, cls.name, file);
    args.cls = cls;
    for (const prop of cls.props) {
      const { decos, unresolved } = this.resolveUses(prop.decorators, file);
      for (const d of decos) this.applyProperty(args, d, prop, file, strict);
      const used = decos.some((d) => PHYSICAL.has(d.name));
      if (!used) for (const u of unresolved) this.unresolvedDiagnostic(cls.name, prop.name, file, u);
    }
    const { decos, unresolved } = this.resolveUses(cls.decorators, file);
    for (const d of decos) this.applyClass(args, d, file, cls.line, cls);
    // what the flag would make of an unresolved class decorator, an entity, the class already is
    // (one that registers a DTO, a GraphQL type or a cache name beside @Entity): nothing to say
    const isEntity = decos.some((d) => ENTITY_DECORATORS.has(d.name));
    if (!isEntity) for (const u of unresolved) {
      this.project.report(`uc\u0000${file}\u0000${u.use.line}`, {
        severity: 'info', code: 'typeorm/unresolved-decorator', file, line: u.use.line,
        message: `class decorator @${u.use.n} on ${cls.name} does not resolve to a TypeORM decorator (${u.why}); if it stands for one, say so: --typeorm-decorator ${u.use.n}=Entity`,
      });
    }
    return args;
  }

  private origin(file: string, line: number): Origin {
    return { file, line };
  }

  private applyProperty(a: TargetArgs, d: DecoE, prop: PropertyFact, file: string, strict: boolean): void {
    const line = prop.line;
    const what = `@${d.via ?? d.name} on ${a.name}.${prop.name}`;
    const origin = this.origin(file, line);
    const design = (): DesignResult => this.project.designOf(prop.design, file, strict);
    const [a0, a1, a2] = d.args;
    switch (d.name) {
      case 'Column': {
        // Column(() => Embedded, options?) registers an embedded
        if (isFnE(a0)) {
          a.embeddeds.push({
            target: a.key, propertyName: prop.name, type: a0, origin,
            prefix: ((): string | boolean | undefined => {
              const p = get(a1, 'prefix');
              return typeof p === 'string' || typeof p === 'boolean' ? p : undefined;
            })(),
            isArray: ((): boolean => {
              const dr = design();
              return (typeof dr.t === 'object' && dr.t.ctor === 'Array') || get(a1, 'array') === true;
            })(),
          });
          return;
        }
        this.regularColumn(a, prop, a0, a1, false, file, line, what, origin, design);
        return;
      }
      case 'PrimaryColumn':
        this.regularColumn(a, prop, a0, a1, true, file, line, what, origin, design);
        return;
      case 'PrimaryGeneratedColumn': {
        let strategy = 'increment';
        let opts: E = undefined;
        if (typeof a0 === 'string') strategy = a0;
        else if (isObjE(a0)) opts = a0;
        else if (a0 !== undefined) this.notLiteral(file, line, `${what} strategy`, a0);
        const options = isObjE(a1) ? this.columnOptions(mergeObj(opts, a1), file, line, what) : this.columnOptions(opts, file, line, what);
        if (!options.type) {
          if (strategy === 'increment' || strategy === 'identity') options.type = { ctor: 'Number' };
          else if (strategy === 'uuid') options.type = 'uuid';
          else if (strategy === 'rowid') options.type = 'int';
        }
        options.primary = true;
        a.columns.push({ target: a.key, propertyName: prop.name, mode: 'regular', options, origin });
        a.generations.push({ propertyName: prop.name, strategy });
        return;
      }
      case 'CreateDateColumn':
      case 'UpdateDateColumn':
      case 'DeleteDateColumn':
      case 'VersionColumn':
      case 'TreeLevelColumn': {
        const mode: ColumnMode = d.name === 'CreateDateColumn' ? 'createDate' : d.name === 'UpdateDateColumn' ? 'updateDate' : d.name === 'DeleteDateColumn' ? 'deleteDate' : d.name === 'VersionColumn' ? 'version' : 'treeLevel';
        a.columns.push({ target: a.key, propertyName: prop.name, mode, options: this.columnOptions(a0, file, line, what), origin });
        return;
      }
      case 'ObjectIdColumn':
        a.mongo = true;
        return;
      case 'Generated':
        a.generations.push({ propertyName: prop.name, strategy: typeof a0 === 'string' ? a0 : 'increment' });
        return;
      case 'ManyToOne':
      case 'OneToOne':
      case 'OneToMany':
      case 'ManyToMany': {
        const relationType: RelationType = d.name === 'ManyToOne' ? 'many-to-one' : d.name === 'OneToOne' ? 'one-to-one' : d.name === 'OneToMany' ? 'one-to-many' : 'many-to-many';
        let inverseSide: E;
        let opts: E = a2;
        if (d.name === 'OneToMany') inverseSide = a1;
        else if (isObjE(a1)) opts = a1;
        else inverseSide = a1;
        if (d.name === 'OneToMany' && isObjE(a2)) opts = a2;
        a.relations.push(this.relation(a, prop.name, relationType, a0, inverseSide, opts, file, line, what, origin));
        return;
      }
      case 'TreeParent':
      case 'TreeChildren': {
        const self: E = { $: 'sym', s: { k: 'class', file, c: a.cls! } };
        a.relations.push({
          ...this.relation(a, prop.name, d.name === 'TreeParent' ? 'many-to-one' : 'one-to-many', self, undefined, a0, file, line, what, origin),
          ...(d.name === 'TreeParent' ? { isTreeParent: true } : {}),
        });
        return;
      }
      case 'JoinColumn': {
        const list = isArrE(a0) ? a0.e : [a0 ?? { $: 'obj', p: new Map() }];
        for (const o of list) a.joinColumns.push({ target: a.key, propertyName: prop.name, ...this.joinColumnOpts(o, file, line, what) });
        return;
      }
      case 'JoinTable':
        a.joinTables.push(this.joinTable(a0, a.key, prop.name, file, line, what));
        return;
      case 'Index':
      case 'Unique': {
        const opts = isObjE(a0) ? a0 : isObjE(a1) ? a1 : a2;
        if (d.name === 'Index' && !this.b(opts, 'unique', file, line, what)) return;
        const name = typeof a0 === 'string' ? a0 : undefined;
        a.uniques.push({ target: a.key, ...(name ? { name } : {}), columns: { $: 'arr', e: [prop.name] }, origin, ...(get(opts, 'where') !== undefined ? { partial: true } : {}) });
        return;
      }
      case 'ForeignKey': {
        const opts = isObjE(a1) ? a1 : isObjE(a2) ? a2 : d.args[3];
        a.foreignKeys.push({
          target: a.key, propertyName: prop.name, type: a0, origin,
          ...(typeof a1 === 'string' || isFnE(a1) ? { inverseSide: a1 } : {}),
          ...this.fkActions(opts, file, line, what),
        });
        return;
      }
      default:
        return;
    }
  }

  /** Column(typeOrOptions?, options?) and PrimaryColumn(typeOrOptions?, options?), as TypeORM normalises them. */
  private regularColumn(a: TargetArgs, prop: PropertyFact, a0: E, a1: E, primary: boolean, file: string, line: number, what: string, origin: Origin, design: () => DesignResult): void {
    let type: ColumnTypeRef | undefined;
    let opts: E = a1;
    if (typeof a0 === 'string') type = a0;
    else if (isSymE(a0) && (!primary || (a0.s.k === 'global' && ['String', 'Boolean', 'Number'].includes(a0.s.name)))) type = this.typeRef(a0);
    else if (isObjE(a0)) opts = a0;
    else if (a0 !== undefined) this.notLiteral(file, line, `${what} argument`, a0);
    const options = this.columnOptions(opts, file, line, what);
    let inferred: DesignResult | undefined;
    if (!type && !options.type) {
      inferred = design();
      type = inferred.t;
    }
    if (!options.type && type) options.type = type;
    if (primary) options.primary = true;
    a.columns.push({ target: a.key, propertyName: prop.name, mode: 'regular', options, origin, ...(inferred ? { design: inferred } : {}) });
    if (!primary && this.b(opts, 'unique', file, line, what)) a.uniques.push({ target: a.key, columns: { $: 'arr', e: [prop.name] }, origin });
    const g = get(opts, 'generated');
    if (g) a.generations.push({ propertyName: prop.name, strategy: typeof g === 'string' ? g : 'increment' });
  }

  private fkActions(opts: E, file: string, line: number, what: string): { name?: string; onDelete?: string; onUpdate?: string } {
    const out: { name?: string; onDelete?: string; onUpdate?: string } = {};
    const name = this.s(opts, 'name', file, line, what);
    if (name) out.name = name;
    const onDelete = this.s(opts, 'onDelete', file, line, what);
    if (onDelete) out.onDelete = onDelete;
    const onUpdate = this.s(opts, 'onUpdate', file, line, what);
    if (onUpdate) out.onUpdate = onUpdate;
    return out;
  }

  /** JoinTable options (decorator or EntitySchema relation). */
  private joinTable(o: E, target: string, propertyName: string, file: string, line: number, what: string): JoinTableArgs {
    const jt: JoinTableArgs = { target, propertyName };
    const name = this.s(o, 'name', file, line, what);
    if (name) jt.name = name;
    const jc = get(o, 'joinColumn') ?? get(o, 'joinColumns');
    const ijc = get(o, 'inverseJoinColumn') ?? get(o, 'inverseJoinColumns');
    if (jc !== undefined) jt.joinColumns = (isArrE(jc) ? jc.e : [jc]).map((x) => this.joinColumnOpts(x, file, line, what));
    if (ijc !== undefined) jt.inverseJoinColumns = (isArrE(ijc) ? ijc.e : [ijc]).map((x) => this.joinColumnOpts(x, file, line, what));
    const schema = this.s(o, 'schema', file, line, what);
    if (schema) jt.schema = schema;
    const database = this.s(o, 'database', file, line, what);
    if (database) jt.database = database;
    return jt;
  }

  private joinColumnOpts(o: E, file: string, line: number, what: string): JoinColumnOpts {
    const out: JoinColumnOpts = {};
    const name = this.s(o, 'name', file, line, what);
    if (name) out.name = name;
    const ref = this.s(o, 'referencedColumnName', file, line, what);
    if (ref) out.referencedColumnName = ref;
    const fk = this.s(o, 'foreignKeyConstraintName', file, line, what);
    if (fk) out.foreignKeyConstraintName = fk;
    return out;
  }

  private relation(a: TargetArgs, propertyName: string, relationType: RelationType, type: E, inverseSide: E, opts: E, file: string, line: number, what: string, origin: Origin): RelationArgs {
    const r: RelationArgs = { target: a.key, propertyName, relationType, type, createForeignKeyConstraints: true, origin };
    if (inverseSide !== undefined) r.inverseSide = inverseSide;
    const nullable = this.b(opts, 'nullable', file, line, what);
    if (nullable !== undefined) r.nullable = nullable;
    // TypeORM 0.3's RelationOptions has no `primary`: an object literal carrying it does not compile
    // against 0.3 unless cast, so uncast it is code written for TypeORM 0.2 (a cast one 0.3 ignores)
    if (!(isObjE(opts) && opts.cast) && this.b(opts, 'primary', file, line, what) === true) r.primary = true;
    Object.assign(r, this.fkActions(opts, file, line, what));
    delete (r as { name?: string }).name;
    if (this.b(opts, 'createForeignKeyConstraints', file, line, what) === false) r.createForeignKeyConstraints = false;
    return r;
  }

  private applyClass(a: TargetArgs, d: DecoE, file: string, line: number, cls?: ClassFact): void {
    const what = `@${d.via ?? d.name} on ${a.name}`;
    const origin = this.origin(file, line);
    const [a0, a1, a2] = d.args;
    switch (d.name) {
      case 'Entity':
      case 'ViewEntity': {
        const opts = isObjE(a0) ? a0 : a1;
        const t: TableArgs = { target: a.key, type: d.name === 'Entity' ? 'regular' : 'view', origin };
        const name = typeof a0 === 'string' ? a0 : this.s(opts, 'name', file, line, what);
        if (a0 !== undefined && typeof a0 !== 'string' && !isObjE(a0)) this.notLiteral(file, line, `${what} name`, a0);
        if (name) t.name = name;
        const schema = this.s(opts, 'schema', file, line, what);
        if (schema) t.schema = schema;
        const database = this.s(opts, 'database', file, line, what);
        if (database) t.database = database;
        a.tables.push(t);
        return;
      }
      case 'ChildEntity':
        a.tables.push({ target: a.key, type: 'entity-child', origin });
        if (a0 !== undefined) a.discriminatorValue = a0;
        return;
      case 'TableInheritance': {
        const col = get(a0, 'column');
        const pattern = str(get(a0, 'pattern')) ?? 'STI';
        a.inheritance = {
          pattern,
          ...(col === undefined ? {} : { column: typeof col === 'string' ? { name: col } : this.columnOptions(col, file, line, what) }),
        };
        return;
      }
      case 'Tree': {
        const type = str(a0);
        if (!type) {
          this.notLiteral(file, line, `${what} tree type`, a0);
          return;
        }
        const closureTableName = type === 'closure-table' ? str(get(a1, 'closureTableName')) : undefined;
        a.tree = { type, ...(closureTableName ? { closureTableName } : {}), ...(a1 !== undefined ? { options: a1 } : {}) };
        return;
      }
      case 'Unique':
      case 'Index': {
        const name = typeof a0 === 'string' ? a0 : undefined;
        const fields = typeof a0 === 'string' ? a1 : a0;
        const opts = isObjE(a0) && !isArrE(a0) ? a0 : isObjE(a1) ? a1 : a2;
        if (d.name === 'Index' && !this.b(opts, 'unique', file, line, what)) return;
        if (fields === undefined || isObjE(fields)) return;
        a.uniques.push({ target: a.key, ...(name ? { name } : {}), columns: fields, origin, ...(get(opts, 'where') !== undefined ? { partial: true } : {}) });
        return;
      }
      case 'ForeignKey': {
        const columnNames = isArrE(a1) ? a1.e.filter((x): x is string => typeof x === 'string') : undefined;
        const referencedColumnNames = isArrE(a2) ? a2.e.filter((x): x is string => typeof x === 'string') : undefined;
        const opts = isObjE(a1) ? a1 : isObjE(a2) ? a2 : d.args[3];
        a.foreignKeys.push({
          target: a.key, type: a0, origin,
          ...(columnNames ? { columnNames } : {}),
          ...(referencedColumnNames ? { referencedColumnNames } : {}),
          ...this.fkActions(opts, file, line, what),
        });
        return;
      }
      default:
        void cls;
        return;
    }
  }

  // ---- EntitySchema

  /** An EntitySchema's options read into the same arguments as decorators would give. */
  readSchema(file: string, s: SchemaFact): TargetArgs | undefined {
    const o = this.project.eval(s.options, { file, frames: [], depth: 0 });
    const line = s.line;
    const nameE = get(o, 'name');
    const name = typeof nameE === 'string' ? nameE : undefined;
    if (!name) {
      this.notLiteral(file, line, 'EntitySchema name', nameE);
      return undefined;
    }
    const targetE = get(o, 'target');
    const key = isSymE(targetE) && targetE.s.k === 'class' ? classKey(targetE.s.file, targetE.s.c.name) : schemaKey(name);
    const a = newArgs(key, isSymE(targetE) && targetE.s.k === 'class' ? targetE.s.c.name : name, file);
    a.schema = s;
    const what = `EntitySchema ${name}`;
    const origin = this.origin(file, line);
    const type = str(get(o, 'type')) ?? 'regular';
    const t: TableArgs = { target: key, type: type === 'view' ? 'view' : type === 'entity-child' ? 'entity-child' : 'regular', origin };
    const tableName = this.s(o, 'tableName', file, line, what);
    if (tableName) t.name = tableName;
    const schema = this.s(o, 'schema', file, line, what);
    if (schema) t.schema = schema;
    const database = this.s(o, 'database', file, line, what);
    if (database) t.database = database;
    a.tables.push(t);
    const inh = get(o, 'inheritance');
    if (isObjE(inh)) {
      const col = get(inh, 'column');
      a.inheritance = { pattern: str(get(inh, 'pattern')) ?? 'STI', ...(col === undefined ? {} : { column: typeof col === 'string' ? { name: col } : this.columnOptions(col, file, line, what) }) };
    }
    if (get(o, 'discriminatorValue') !== undefined) a.discriminatorValue = get(o, 'discriminatorValue');
    const cols = get(o, 'columns');
    if (isObjE(cols)) {
      for (const [prop, c] of cols.p) {
        const cw = `${what} column ${prop}`;
        let mode: ColumnMode = 'regular';
        if (get(c, 'createDate') === true) mode = 'createDate';
        if (get(c, 'updateDate') === true) mode = 'updateDate';
        if (get(c, 'deleteDate') === true) mode = 'deleteDate';
        if (get(c, 'version') === true) mode = 'version';
        if (get(c, 'treeLevel') === true) mode = 'treeLevel';
        if (get(c, 'objectId') === true) {
          a.mongo = true;
          continue;
        }
        if (get(c, 'virtualProperty') === true) continue;
        const options = this.columnOptions(c, file, line, cw);
        a.columns.push({ target: key, propertyName: prop, mode, options, origin });
        const g = get(c, 'generated');
        if (g) a.generations.push({ propertyName: prop, strategy: typeof g === 'string' ? g : 'increment' });
        if (get(c, 'unique') === true) a.uniques.push({ target: key, columns: { $: 'arr', e: [prop] }, origin });
        const fk = get(c, 'foreignKey');
        if (isObjE(fk)) {
          a.foreignKeys.push({ target: key, propertyName: prop, type: get(fk, 'target'), origin, ...(get(fk, 'inverseSide') !== undefined ? { inverseSide: get(fk, 'inverseSide') } : {}), ...this.fkActions(fk, file, line, cw) });
        }
      }
    }
    const rels = get(o, 'relations');
    if (isObjE(rels)) {
      for (const [prop, r] of rels.p) {
        const rw = `${what} relation ${prop}`;
        const rt = str(get(r, 'type')) as RelationType | undefined;
        if (!rt || !['many-to-one', 'one-to-one', 'one-to-many', 'many-to-many'].includes(rt)) {
          this.notLiteral(file, line, `${rw} type`, get(r, 'type'));
          continue;
        }
        const rel = this.relation(a, prop, rt, get(r, 'target'), get(r, 'inverseSide'), r, file, line, rw, origin);
        if (get(r, 'treeParent') === true) rel.isTreeParent = true;
        a.relations.push(rel);
        const jc = get(r, 'joinColumn');
        if (jc === true) a.joinColumns.push({ target: key, propertyName: prop });
        else if (jc !== undefined && jc !== false) for (const x of isArrE(jc) ? jc.e : [jc]) a.joinColumns.push({ target: key, propertyName: prop, ...this.joinColumnOpts(x, file, line, rw) });
        const jt = get(r, 'joinTable');
        if (jt === true) a.joinTables.push({ target: key, propertyName: prop });
        else if (isObjE(jt)) a.joinTables.push(this.joinTable(jt, key, prop, file, line, rw));
      }
    }
    for (const list of ['uniques', 'indices'] as const) {
      const l = get(o, list);
      if (!isArrE(l)) continue;
      for (const u of l.e) {
        if (list === 'indices' && get(u, 'unique') !== true) continue;
        const n = str(get(u, 'name'));
        a.uniques.push({ target: key, ...(n ? { name: n } : {}), columns: get(u, 'columns'), origin, ...(get(u, 'where') !== undefined ? { partial: true } : {}) });
      }
    }
    const fks = get(o, 'foreignKeys');
    if (isArrE(fks)) {
      for (const fk of fks.e) {
        const cn = get(fk, 'columnNames');
        const rn = get(fk, 'referencedColumnNames');
        a.foreignKeys.push({
          target: key, type: get(fk, 'target'), origin,
          ...(isArrE(cn) ? { columnNames: cn.e.filter((x): x is string => typeof x === 'string') } : {}),
          ...(isArrE(rn) ? { referencedColumnNames: rn.e.filter((x): x is string => typeof x === 'string') } : {}),
          ...this.fkActions(fk, file, line, what),
        });
      }
    }
    const tree = get(o, 'trees') ?? get(o, 'tree');
    if (isObjE(tree) && str(get(tree, 'type'))) a.tree = { type: str(get(tree, 'type'))! };
    return a;
  }
}

/** Decorators that make a property part of the table (columns, relations, embedded). */
const PHYSICAL = new Set([
  'Column', 'PrimaryColumn', 'PrimaryGeneratedColumn', 'CreateDateColumn', 'UpdateDateColumn', 'DeleteDateColumn', 'VersionColumn',
  'ManyToOne', 'OneToOne', 'OneToMany', 'ManyToMany', 'TreeParent', 'TreeChildren', 'TreeLevelColumn', 'ObjectIdColumn',
  'VirtualColumn', 'ViewColumn', 'RelationId', 'RelationCount',
]);

function mergeObj(a: E, b: E): E {
  if (!isObjE(a)) return b;
  if (!isObjE(b)) return a;
  return { $: 'obj', p: new Map([...a.p, ...b.p]) };
}

export { symName };
