import type { Diagnostic, GeneratedKind, NeutralType, Origin, ReferentialAction } from '@schema-strata/core/extract';
import { tableId } from '@schema-strata/core/extract';
import type { Arg, Chain, Cond, FnIR, KnexFacts, Param, Root, Stmt, Val } from './knex-facts.js';
import { isObj, isUndeclaredName } from './knex-parse.js';
import { PMap } from './knex-pmap.js';
import { TrackedMap, type MapAccess } from './knex-track.js';
import {
  argText,
  columnType,
  COLUMN_METHODS,
  defaultNamespace,
  defaultText,
  KnexFunction,
  Opaque,
  RawSql,
  type ArgValue,
  type Dialect,
  type KnexClientInfo,
} from './knex-types.js';
import type { AssumedValue } from './knex-config.js';

/*
 * The replay of one migration's facts against the schema as it stands: an interpreter of the
 * small language of knex-facts.ts that knows what Knex's schema, table and column builders do
 * (lib/schema/builder.js, tablebuilder.js, columnbuilder.js, tablecompiler.js). Nothing is run:
 * names, loops and conditions are evaluated against the replayed state only.
 */

// ------------------------------------------------------------------ state

export interface ColumnState {
  /** Stable id within the table: the first name when renamed. */
  id: string;
  name: string;
  type: NeutralType;
  native: string;
  nullable: boolean;
  default?: string;
  generated?: GeneratedKind;
  origin: Origin;
}

export interface ForeignKeyState {
  columns: string[];
  /** Stable id of the referenced table. */
  refTable: string;
  refColumns: string[];
  onDelete?: ReferentialAction;
  onUpdate?: ReferentialAction;
  /** The name the code states. */
  name?: string;
  /** The name the database gives it (stated, or Knex's default at creation). */
  dbName: string;
}

export interface UniqueState {
  columns: string[];
  name?: string;
  dbName: string;
}

export interface TableState {
  id: string;
  name: string;
  namespace?: string;
  columns: ColumnState[];
  primaryKey: string[];
  foreignKeys: ForeignKeyState[];
  uniques: UniqueState[];
  origin: Origin;
}

export interface ViewState {
  id: string;
  name: string;
  namespace?: string;
  origin: Origin;
}

/** The replayed schema after some migrations. Treated as immutable once a migration is done. */
export interface SchemaState {
  /** Tables by qualified physical name. */
  tables: PMap<TableState>;
  views: ReadonlyMap<string, ViewState>;
  /** Native enum types (PostgreSQL), by qualified name. */
  enums: ReadonlyMap<string, string[]>;
  /** Ids of live tables that differ from their name (renamed tables): id -> key. */
  moved: ReadonlyMap<string, string>;
  /**
   * Tables that raw SQL creates (`CREATE TABLE`, `ALTER TABLE ... RENAME TO`), by qualified name:
   * the place of that statement. Raw SQL is not interpreted; this only tells a builder call on
   * such a table why the replay does not have it.
   */
  rawTables: ReadonlyMap<string, string>;
}

/** The keys of each part of the state that a migration read and wrote. */
export type StateAccess = { readonly [P in keyof SchemaState]: MapAccess };

export const EMPTY_STATE: SchemaState = { tables: new PMap(), views: new Map(), enums: new Map(), moved: new Map(), rawTables: new Map() };

export interface ReplayCounters {
  rawStatements: number;
  rawSchemaStatements: number;
  unresolved: number;
}

/** A file of the version, as the replay sees it. */
export interface FileContext {
  path: string;
  facts: KnexFacts;
  /** Import specifier -> path of the project file it resolves to (absent: not in the version). */
  imports: ReadonlyMap<string, string>;
}

// ------------------------------------------------------------------ runtime values

class KnexRole {}
class SchemaRole {
  constructor(readonly ns?: string) {}
}
class QueryRole {}
class FnHandle {
  constructor(readonly file: FileContext, readonly fn: FnIR, readonly closure?: Frame) {}
}
class Namespace {
  constructor(readonly file: FileContext) {}
}
/**
 * `knex.client` and `knex.client.config`: not known as values (opaque), but read for `dialect`,
 * `driverName` and `config.client` they give what the run's client holds, when it is known.
 * A value not known statically read for `.client` is taken as a knex instance's (as a chain on
 * such a value starting with `.schema` is taken as a builder).
 */
class ClientRole extends Opaque {}
class ConfigRole extends Opaque {}
/**
 * A read from a name the project never declares (`process.env.DB_CLIENT`, an application's
 * global settings object): its text is the dotted path, which --knex-assume may give a value.
 */
class GlobalRead extends Opaque {}

interface ForeignData {
  columns: string[];
  references?: string[];
  inTable?: string;
  keyName?: string;
  onDelete?: string;
  onUpdate?: string;
  line: number;
}

interface ColumnBuilder {
  /** The foreign key `.references()` started on this column: Knex extends the column builder with its methods. */
  fk?: ForeignData;
  method: string;
  name: string;
  args: ArgValue[];
  modifiers: Map<string, ArgValue[]>;
  alter: boolean;
  alterNullable: boolean;
  alterType: boolean;
  line: number;
}

interface TableStatement {
  m: string;
  args: ArgValue[];
  fk?: ForeignData;
  line: number;
}

interface TableBuilder {
  mode: 'create' | 'alter';
  ns?: string;
  name: string;
  columns: ColumnBuilder[];
  statements: TableStatement[];
  line: number;
}

class TableRole {
  constructor(readonly tb: TableBuilder) {}
}
class ColumnRole {
  constructor(readonly tb: TableBuilder, readonly col: ColumnBuilder) {}
}
class ForeignRole {
  constructor(readonly tb: TableBuilder, readonly fk: ForeignData, readonly col?: ColumnBuilder) {}
}

type Runtime = ArgValue | KnexRole | SchemaRole | QueryRole | TableRole | ColumnRole | ForeignRole | FnHandle | Namespace;

class Frame {
  readonly vars = new Map<string, Runtime>();
  constructor(readonly file: FileContext, readonly parent?: Frame, readonly self?: Runtime) {}
  lookup(name: string): { found: boolean; value?: Runtime } {
    if (name === 'this') return { found: true, value: this.thisValue() };
    for (let f: Frame | undefined = this; f; f = f.parent) {
      if (f.vars.has(name)) return { found: true, value: f.vars.get(name) };
    }
    return { found: false };
  }
  thisValue(): Runtime | undefined {
    for (let f: Frame | undefined = this; f; f = f.parent) if (f.self !== undefined) return f.self;
    return undefined;
  }
}

const isRole = (v: unknown): boolean =>
  v instanceof KnexRole || v instanceof SchemaRole || v instanceof TableRole || v instanceof ColumnRole || v instanceof ForeignRole;

function isPlainObject(v: unknown): v is { [k: string]: ArgValue } {
  return typeof v === 'object' && v !== null && !Array.isArray(v) && Object.getPrototypeOf(v) === Object.prototype;
}

const ACTIONS: Record<string, ReferentialAction> = {
  cascade: 'cascade',
  restrict: 'restrict',
  'no action': 'no action',
  'set null': 'set null',
  'set default': 'set default',
};

/** Knex's default index and constraint names (lib/schema/tablecompiler.js `_indexCommand`). */
export function knexIndexName(type: string, table: string, columns: string[]): string {
  return `${table.replace(/\.|-/g, '_')}_${columns.join('_')}_${type}`.toLowerCase();
}

const SCHEMA_NOOP = new Set([
  'createSchema', 'createSchemaIfNotExists', 'createExtension', 'createExtensionIfNotExists', 'dropExtension', 'dropExtensionIfExists',
  'view', 'alterView', 'refreshMaterializedView', 'queryContext', 'connection', 'debug', 'timeout', 'toSQL', 'toString',
  'generateDdlCommands', 'then', 'catch', 'finally', 'options', 'transacting',
]);
const TABLE_NOOP = new Set(['comment', 'engine', 'charset', 'collate', 'inherits', 'queryContext', 'index', 'dropIndex', 'check', 'dropChecks', 'setIndex']);
const COLUMN_NOOP = new Set([
  'unsigned', 'first', 'after', 'comment', 'collate', 'check', 'checkPositive', 'checkNegative', 'checkIn', 'checkNotIn', 'checkBetween',
  'checkLength', 'checkRegex', 'queryContext', 'index', 'drop', 'alterType',
]);
const ALTER_ONLY = new Set(['renameColumn', 'dropColumn', 'dropColumns', 'dropTimestamps', 'setNullable', 'dropNullable']);
const TABLE_STATEMENTS = new Set([
  'primary', 'unique', 'dropPrimary', 'dropPrimaryIfExists', 'dropUnique', 'dropUniqueIfExists', 'dropForeign', 'dropForeignIfExists',
  'renameColumn', 'dropColumn', 'dropColumns', 'setNullable', 'dropNullable',
]);
const MAX_DEPTH = 40;
/** The most rounds a counted loop is replayed for; a longer one is treated as not known statically. */
const MAX_ROUNDS = 10_000;

/** How a statement ended its block early. */
type Jump = 'return' | 'break' | 'continue' | null;

// ------------------------------------------------------------------ the replay

/**
 * Replays migrations on a copy-on-write schema state: a migration's result shares every table it
 * did not touch with the state before it, so a fold can keep the state after each migration.
 */
export class Replay {
  private readonly tables: TrackedMap<TableState, PMap<TableState>>;
  private readonly views: TrackedMap<ViewState, Map<string, ViewState>>;
  private readonly enums: TrackedMap<string[], Map<string, string[]>>;
  private readonly moved: TrackedMap<string, Map<string, string>>;
  private readonly rawTables: TrackedMap<string, Map<string, string>>;
  /** Raw statements of this replay by place, to report repeats at one place once. */
  private readonly rawAt = new Map<string, { diagnostic: Diagnostic; message: string; count: number }>();
  private readonly own = new Set<object>();
  readonly diagnostics: Diagnostic[] = [];
  readonly counters: ReplayCounters = { rawStatements: 0, rawSchemaStatements: 0, unresolved: 0 };
  private file: FileContext | null = null;
  private depth = 0;
  /** While a condition or a switch's value is worked out: the reads that were not known (for the diagnostic's hint). */
  private unknownReads: string[] | null = null;

  constructor(
    state: SchemaState,
    private readonly dialect: Dialect,
    private readonly files: { get(path: string): FileContext | undefined },
    /** What `knex.client` holds for the run's client; undefined when the client is not known. */
    private readonly client?: KnexClientInfo,
    /** The schema unqualified names resolve to (the connection's search path), when not the dialect's default. */
    private readonly schema?: string,
    /** Values of reads from undeclared names, by dotted path (--knex-assume). */
    private readonly assume: ReadonlyMap<string, AssumedValue> = NO_ASSUMPTIONS,
  ) {
    // the state's maps are not changed: each is copied on its first write
    this.tables = new TrackedMap(state.tables, (m) => new PMap(m));
    this.views = new TrackedMap(state.views as Map<string, ViewState>, (m) => new Map(m));
    this.enums = new TrackedMap(state.enums as Map<string, string[]>, (m) => new Map(m));
    this.moved = new TrackedMap(state.moved as Map<string, string>, (m) => new Map(m));
    this.rawTables = new TrackedMap(state.rawTables as Map<string, string>, (m) => new Map(m));
  }

  state(): SchemaState {
    return { tables: this.tables.result(), views: this.views.result(), enums: this.enums.result(), moved: this.moved.result(), rawTables: this.rawTables.result() };
  }

  /** What the replay read and wrote of each part of the state. */
  access(): StateAccess {
    return { tables: this.tables, views: this.views, enums: this.enums, moved: this.moved, rawTables: this.rawTables };
  }

  // ---------------------------------------------------------------- entry points

  /** Run a migration's `up` (or an init file's setup) with a knex instance. */
  runFile(file: FileContext, role: 'migration' | 'init'): void {
    this.file = file;
    const facts = file.facts;
    const top = new Frame(file);
    if (role === 'init' && facts.top) this.exec(facts.top, top);
    const key = role === 'init' ? facts.main : facts.up;
    if (!key) {
      if (role === 'migration') {
        // (`export default { up }`, the form of migration runners other than Knex's own)
        const d = facts.exports['default'];
        const inDefault = !!d && 'val' in d && isObj(d.val) && d.val.obj.some(([k]) => k === 'up');
        this.warn('knex/no-up', inDefault
          ? 'no up() function is exported: the default export holds one, but Knex takes up() from the module itself, so it would refuse this migration (a migration for another runner?); it is left out'
          : 'no up() function is exported: Knex would refuse this migration; it is left out', 1);
      }
      else if (!facts.top) this.warn('knex/no-setup', 'the init file has no up(), default-exported function or top-level builder calls', 1);
      return;
    }
    const fn = facts.fns[key];
    if (!fn) return;
    this.call(new FnHandle(file, fn, top), [new KnexRole()], fn.line);
  }

  // ---------------------------------------------------------------- diagnostics

  private diag(severity: Diagnostic['severity'], code: string, message: string, line?: number): void {
    this.diagnostics.push({ severity, code, message, ...(this.file ? { file: this.file.path } : {}), ...(line ? { line } : {}) });
  }
  private warn(code: string, message: string, line?: number): void {
    this.diag('warning', code, message, line);
  }
  private info(code: string, message: string, line?: number): void {
    this.diag('info', code, message, line);
  }

  // ---------------------------------------------------------------- statements

  /** Run statements; what ended them early: a `return`, a `break` or a `continue`. */
  private exec(body: readonly Stmt[], frame: Frame): Jump {
    for (let i = 0; i < body.length; i++) {
      const j = this.stmt(body[i]!, frame, body, i);
      if (j) return j;
    }
    return null;
  }

  /** Run one statement (`body[at]`: what follows it decides whether an undecided `if (x) return` matters). */
  private stmt(st: Stmt, frame: Frame, body?: readonly Stmt[], at = 0): Jump {
    switch (st.k) {
      case 'chain':
        this.chain(st.chain, frame, st.line, st.lazy);
        return null;
      case 'return':
        return 'return';
      case 'break':
        return 'break';
      case 'continue':
        return 'continue';
      case 'block':
        this.exec(st.body, new Frame(frame.file, frame));
        return null;
      case 'switch': {
        const outer = this.startNoting();
        const on = this.value(st.on, frame);
        const reads = this.stopNoting(outer);
        const known = on === null || ['string', 'number', 'boolean'].includes(typeof on);
        let start = known ? st.cases.findIndex((c) => c.test !== undefined && this.value(c.test, frame) === on) : -1;
        if (start < 0 && known) start = st.cases.findIndex((c) => c.test === undefined);
        if (!known) {
          // not known: the first clause with statements, as for an if whose condition is not known
          start = st.cases.findIndex((c) => c.body.some((x) => x.k !== 'break'));
          if (st.cases.some((c) => mayChangeSchema(c.body))) {
            this.info('knex/condition-unknown', `the value of a switch (${valText(st.on)}) is not known statically; its first clause is replayed${hint(reads)}`, st.line);
          }
        }
        if (start < 0) return null;
        const f = new Frame(frame.file, frame);
        for (let i = start; i < st.cases.length; i++) {
          const j = this.exec(st.cases[i]!.body, f);
          if (j === 'break') return null;
          if (j) return j;
        }
        return null;
      }
      case 'if': {
        const outer = this.startNoting();
        const c = this.cond(st.cond, frame);
        const reads = this.stopNoting(outer);
        if (c === undefined) {
          // (a branch that returns or breaks decides whether the statements after the if run)
          const jumps = mayJump(st.then) || mayJump(st.else);
          if (mayChangeSchema(st.then) || mayChangeSchema(st.else) || (jumps && !!body && mayChangeSchema(body.slice(at + 1)))) {
            this.info('knex/condition-unknown', `condition ${condText(st.cond)} is not known statically; its first branch is replayed${hint(reads)}`, st.line);
          }
          return this.exec(st.then, new Frame(frame.file, frame));
        }
        return this.exec(c ? st.then : st.else, new Frame(frame.file, frame));
      }
      case 'each': {
        const over = this.value(st.over, frame);
        const items = Array.isArray(over) ? over : undefined;
        if (!items) {
          if (mayChangeSchema(st.body)) {
            this.counters.unresolved++;
            this.warn('knex/loop-unknown', `the values of a loop (${valText(st.over)}) are not known statically; the loop is not replayed`, st.line);
          }
          return null;
        }
        for (const item of items) {
          const f = new Frame(frame.file, frame);
          bindParams(f, st.bind, [item]);
          const j = this.exec(st.body, f);
          if (j === 'break' && !st.fn) break;
          if (j === 'return' && !st.fn) return 'return';
        }
        return null;
      }
      case 'invoke': {
        const target = st.fn;
        let fn: Runtime | undefined;
        if ('imp' in target) fn = this.importValue(frame.file, target.imp, target.name, target.path);
        else {
          const ir = frame.file.facts.fns[target.local];
          fn = ir ? new FnHandle(frame.file, ir, frame) : undefined;
        }
        const args = st.args.map((a) => this.arg(a, frame));
        if (fn instanceof FnHandle) {
          this.call(fn, args, st.line);
          return null;
        }
        if (args.some(isRole)) {
          this.counters.unresolved++;
          if ('callee' in target && target.callee !== undefined && !frame.file.imports.has(target.imp)) {
            // a package that is not one of the repository's
            this.warn('knex/call-not-followed', `${target.callee}(...) is given a Knex builder but its code is not in the project; its effects are left out`, st.line);
            return null;
          }
          const name = 'imp' in target ? `${target.name}${target.path ? '.' + target.path.join('.') : ''} from '${target.imp}'` : target.local;
          this.warn('knex/call-not-followed', `${name} is given a Knex builder but is not a function of the project that could be read; its effects are left out`, st.line);
        }
        return null;
      }
      case 'opaque': {
        const args = st.args.map((a) => this.arg(a, frame));
        if (args.some(isRole)) {
          this.counters.unresolved++;
          this.warn('knex/call-not-followed', `${st.callee}(...) is given a Knex builder but its code is not in the project; its effects are left out`, st.line);
        }
        return null;
      }
      case 'loop':
        if (mayChangeSchema(st.body)) {
          this.warn('knex/not-followed', 'a for, while or do loop with builder calls is not replayed (only for...of, for...in, forEach and map over known values are)', st.line);
        }
        return null;
      case 'note':
        this.warn(st.code, st.message, st.line);
        return null;
    }
  }

  private call(fn: FnHandle, args: Runtime[], line: number, self?: Runtime): void {
    if (this.depth >= MAX_DEPTH) {
      this.warn('knex/too-deep', 'helper functions call each other too deeply; the rest is not replayed', line);
      return;
    }
    this.depth++;
    const saved = this.file;
    this.file = fn.file;
    try {
      const frame = new Frame(fn.file, fn.closure, fn.fn.usesThis ? self ?? args[0] : undefined);
      bindParams(frame, fn.fn.params, args);
      this.exec(fn.fn.body, frame);
    } finally {
      this.file = saved;
      this.depth--;
    }
  }

  // ---------------------------------------------------------------- values

  private arg(a: Arg, frame: Frame): Runtime {
    if (a !== null && typeof a === 'object') {
      if ('cb' in a) return new FnHandle(frame.file, a.cb, frame);
      if ('fnref' in a) {
        const r = a.fnref;
        if ('imp' in r) return this.importValue(frame.file, r.imp, r.name, r.path);
        const ir = frame.file.facts.fns[r.local];
        return ir ? new FnHandle(frame.file, ir, frame) : new Opaque(r.local);
      }
    }
    return this.value(a as Val, frame);
  }

  /** Resolve a value of the facts against the frame and the other files of the version. */
  value(v: Val, frame: Frame, depth = 0): Runtime {
    if (v === null || typeof v !== 'object') return v;
    if (depth > MAX_DEPTH) return new Opaque('...');
    if ('arr' in v) return v.arr.map((x) => this.value(x, frame, depth + 1) as ArgValue);
    if ('obj' in v) {
      const out: { [k: string]: ArgValue } = {};
      for (const [k, x] of v.obj) {
        const r = this.value(x, frame, depth + 1);
        if (k === '...') {
          if (isPlainObject(r)) Object.assign(out, r);
        } else out[k] = r as ArgValue;
      }
      return out;
    }
    if ('imp' in v) return this.importValue(frame.file, v.imp, v.name, v.path, depth + 1, v.as);
    if ('local' in v) {
      const got = frame.lookup(v.local);
      let cur: Runtime = got.found ? got.value : this.globalRead(v.local);
      for (const k of v.path ?? []) cur = this.member(cur, k, depth + 1);
      return cur;
    }
    if ('cat' in v) {
      const parts = v.cat.map((x) => this.value(x, frame, depth + 1));
      if (parts.every((p) => typeof p === 'string' || typeof p === 'number' || typeof p === 'boolean')) return parts.join('');
      return new Opaque(parts.map((p) => (typeof p === 'string' ? p : `\${${p instanceof Opaque ? p.text : '?'}}`)).join(''));
    }
    if ('raw' in v) {
      const sql = this.value(v.raw, frame, depth + 1);
      return new RawSql(typeof sql === 'string' ? sql : sql instanceof Opaque ? sql.text : '?');
    }
    if ('fn' in v) return new KnexFunction(v.fn, v.args.map((x) => this.value(x, frame, depth + 1) as ArgValue));
    if ('at' in v) return this.member(this.value(v.at, frame, depth + 1), this.value(v.key, frame, depth + 1), depth + 1);
    if ('keys' in v || 'values' in v || 'entries' in v) {
      const base = this.value('keys' in v ? v.keys : 'values' in v ? v.values : v.entries, frame, depth + 1);
      if (!isPlainObject(base) && !Array.isArray(base)) return new Opaque(valText(v));
      const obj = base as Record<string, ArgValue>;
      const keys = Object.keys(obj);
      if ('keys' in v) return keys;
      if ('values' in v) return keys.map((k) => obj[k]!);
      return keys.map((k) => [k, obj[k]!]);
    }
    if ('or' in v) {
      const a = this.value(v.or[0], frame, depth + 1);
      if (a instanceof Opaque || a === undefined || a === null || a === false || a === '' || a === 0) return this.value(v.or[1], frame, depth + 1);
      return a;
    }
    if ('when' in v) {
      const c = this.cond(v.when, frame);
      return this.value(c === false ? v.else : v.then, frame, depth + 1);
    }
    if ('range' in v) {
      const from = this.value(v.range.from, frame, depth + 1);
      const to = this.value(v.range.to, frame, depth + 1);
      if (typeof from !== 'number' || typeof to !== 'number' || !Number.isFinite(from) || !Number.isFinite(to)) return new Opaque(valText(v));
      const out: number[] = [];
      for (let i = from; v.range.inclusive ? i <= to : i < to; i += v.range.step) {
        if (out.length === MAX_ROUNDS) return new Opaque(`${valText(v)} (more than ${MAX_ROUNDS} rounds)`);
        out.push(i);
      }
      return out;
    }
    if ('undef' in v) return undefined;
    // a name the file never declares (the parse leaves it as its text), and process.env.NAME
    if ('expr' in v && isUndeclaredName(v.expr)) return this.globalRead(v.expr);
    if ('env' in v) return this.globalRead(`process.env.${v.env}`);
    return new Opaque(valText(v));
  }

  /** Note the unknown reads from here on (see `unknownReads`); returns what was being noted before. */
  private startNoting(): string[] | null {
    const outer = this.unknownReads;
    this.unknownReads = [];
    return outer;
  }

  /** The reads noted since `startNoting`, which gave `outer`. */
  private stopNoting(outer: string[] | null): string[] {
    const reads = this.unknownReads ?? [];
    this.unknownReads = outer;
    return reads;
  }

  /** A read from an undeclared name: the value --knex-assume gives its path, else not known (and noted, see `unknownReads`). */
  private globalRead(path: string): Runtime {
    const v = this.assume.get(path);
    if (v !== undefined) return v;
    this.unknownReads?.push(path);
    return new GlobalRead(path);
  }

  private member(base: Runtime, key: Runtime, depth: number): Runtime {
    if (base instanceof ClientRole) {
      const c = this.client;
      if (c && key === 'dialect') return c.dialect;
      if (c && key === 'driverName') return c.driverName;
      if (key === 'config') return new ConfigRole(`${base.text}.config`);
      if (!c) this.unknownReads?.push(CLIENT_READ);
      return new Opaque(`${base.text}.${String(key)}`);
    }
    if (base instanceof ConfigRole) {
      if (this.client && key === 'client') return this.client.configClient;
      if (!this.client) this.unknownReads?.push(CLIENT_READ);
      return new Opaque(`${base.text}.${String(key)}`);
    }
    if (base instanceof GlobalRead && (typeof key === 'string' || typeof key === 'number')) {
      const path = `${base.text}.${key}`;
      // (`.client` of an unknown value is a knex instance's, unless the user gave it a value)
      if (key !== 'client' || this.assume.has(path)) return this.globalRead(path);
    }
    if (key === 'client' && (base instanceof KnexRole || base instanceof Opaque)) return new ClientRole(base instanceof Opaque ? `${base.text}.client` : 'knex.client');
    if (base instanceof Namespace) return typeof key === 'string' ? this.exportValue(base.file, key, depth) : new Opaque('?');
    if (Array.isArray(base)) {
      if (key === 'length') return base.length;
      if (typeof key === 'number') return base[key];
      return new Opaque(`[].${String(key)}`);
    }
    if (isPlainObject(base) && (typeof key === 'string' || typeof key === 'number')) {
      return Object.prototype.hasOwnProperty.call(base, String(key)) ? base[String(key)] : undefined;
    }
    if (typeof base === 'string' && key === 'length') return base.length;
    if (base instanceof Opaque) return new Opaque(`${base.text}.${String(key)}`);
    return new Opaque(String(key));
  }

  /** `as`: for a package, the local name, whose value it is when the package is not one of the project's. */
  private importValue(file: FileContext, spec: string, name: string, path?: readonly string[], depth = 0, as?: string): Runtime {
    const target = file.imports.get(spec);
    const ctx = target ? this.files.get(target) : undefined;
    let cur: Runtime = !ctx
      ? as !== undefined
        ? this.value({ expr: as }, new Frame(file), depth + 1)
        : new Opaque(`${name === '*' || name === 'default' ? '' : name + ' from '}'${spec}'`)
      : name === '*' ? new Namespace(ctx) : this.exportValue(ctx, name, depth + 1);
    for (const k of path ?? []) cur = this.member(cur, k, depth + 1);
    return cur;
  }

  private exportValue(file: FileContext, name: string, depth: number): Runtime {
    if (depth > MAX_DEPTH) return new Opaque(name);
    const e = file.facts.exports[name];
    if (!e) {
      for (const spec of file.facts.reexports ?? []) {
        const target = file.imports.get(spec);
        const ctx = target ? this.files.get(target) : undefined;
        if (!ctx || ctx === file) continue;
        const v = this.exportValue(ctx, name, depth + 1);
        if (v !== undefined) return v;
      }
      // CommonJS interop: `import x from './cjs'` is module.exports; a named import reads a member of it
      if (name === 'default') return new Namespace(file);
      const d = file.facts.exports['default'];
      if (d && 'val' in d) return this.member(this.value(d.val, new Frame(file), depth + 1), name, depth + 1);
      return undefined;
    }
    if ('fn' in e) {
      const fn = file.facts.fns[e.fn];
      return fn ? new FnHandle(file, fn, new Frame(file)) : new Opaque(name);
    }
    return this.value(e.val, new Frame(file), depth + 1);
  }

  // ---------------------------------------------------------------- conditions

  private cond(c: Cond, frame: Frame): boolean | undefined {
    if ('lit' in c) return c.lit;
    if ('not' in c) {
      const x = this.cond(c.not, frame);
      return x === undefined ? undefined : !x;
    }
    if ('and' in c) {
      const a = this.cond(c.and[0], frame);
      if (a === false) return false;
      const b = this.cond(c.and[1], frame);
      if (b === false) return false;
      return a === true && b === true ? true : undefined;
    }
    if ('or' in c) {
      const a = this.cond(c.or[0], frame);
      if (a === true) return true;
      const b = this.cond(c.or[1], frame);
      if (b === true) return true;
      return a === false && b === false ? false : undefined;
    }
    if ('chain' in c) {
      const r = this.chain(c.chain, frame, 0);
      return typeof r === 'boolean' ? r : undefined;
    }
    if ('eq' in c) {
      const a = this.value(c.eq[0], frame);
      const b = this.value(c.eq[1], frame);
      if (!known(a) || !known(b)) return undefined;
      return (a === b) !== !!c.neg;
    }
    if ('includes' in c) {
      const list = this.value(c.includes[0], frame);
      const item = this.value(c.includes[1], frame);
      if (!known(item)) return undefined;
      if (typeof list === 'string') return typeof item === 'string' ? list.includes(item) : undefined;
      if (!Array.isArray(list)) return undefined;
      if ((list as Runtime[]).includes(item)) return true;
      return list.every(known) ? false : undefined;
    }
    if ('truthy' in c) {
      const t = c.truthy;
      if (t !== null && typeof t === 'object' && 'when' in t) {
        // `const isPg = <a condition>; if (isPg)`: not known when its condition is not
        const w = this.cond(t.when, frame);
        return w === undefined ? undefined : this.cond({ truthy: w ? t.then : t.else }, frame);
      }
      const v = this.value(c.truthy, frame);
      if (v instanceof Opaque) return undefined;
      if (v === null || v === undefined || typeof v !== 'object') return !!v;
      return true;
    }
    return undefined;
  }

  // ---------------------------------------------------------------- chains

  private chain(ch: Chain, frame: Frame, line: number, lazy?: boolean): Runtime {
    const first = ch.calls[0]?.m;
    const knexish = first === 'schema' || first === 'raw' || first === 'transaction';
    let cur = this.root(ch.root, frame);
    if ((cur === undefined || cur instanceof Opaque || cur instanceof Namespace || isPlainObject(cur)) && knexish) cur = new KnexRole();
    if (lazy && (cur instanceof SchemaRole || (cur instanceof KnexRole && ch.calls.some((c) => c.m === 'schema' || c.m === 'raw')))) {
      const what = ch.calls.filter((c) => c.args).map((c) => c.m).join('.');
      this.warn('knex/not-awaited', `${what}(...) is neither awaited nor returned, so Knex never runs it; it is left out`, line);
      return undefined;
    }
    for (const call of ch.calls) {
      if (cur === undefined || cur === null || (typeof cur !== 'object' && typeof cur !== 'boolean') || cur instanceof Opaque) return undefined;
      let m = call.m;
      if (m === '[]') {
        const k = call.key === undefined ? undefined : this.value(call.key, frame);
        if (typeof k !== 'string') {
          this.counters.unresolved++;
          this.warn('knex/name-unknown', `a method name (${call.key === undefined ? '?' : valText(call.key)}) is not known statically; the call is left out`, call.line || line);
          return undefined;
        }
        m = k;
      }
      cur = this.step(cur, m, call.args ? call.args.map((a) => this.arg(a, frame)) : undefined, call.line || line, frame);
    }
    return cur;
  }

  private root(r: Root, frame: Frame): Runtime {
    if ('local' in r) {
      const got = frame.lookup(r.local);
      return got.found ? got.value : undefined;
    }
    if ('this' in r) return frame.thisValue();
    if ('imp' in r) return this.importValue(frame.file, r.imp, r.name, r.path);
    return undefined;
  }

  private step(cur: Runtime, m: string, args: Runtime[] | undefined, line: number, frame: Frame): Runtime {
    if (cur instanceof KnexRole) {
      if (m === 'schema' && !args) return new SchemaRole();
      if (m === 'raw' && args) {
        this.raw(args[0], line);
        return new QueryRole();
      }
      if (m === 'transaction' && args) {
        const cb = args[0];
        if (cb instanceof FnHandle) this.call(cb, [new KnexRole()], line);
        return undefined;
      }
      return new QueryRole();
    }
    if (cur instanceof SchemaRole) return this.schemaStep(cur, m, args, line);
    if (cur instanceof TableRole) return this.tableStep(cur.tb, m, args, line);
    if (cur instanceof ColumnRole) return this.columnStep(cur, m, args, line);
    if (cur instanceof ForeignRole) return this.foreignStep(cur, m, args, line);
    if (cur instanceof QueryRole) return cur;
    if (cur instanceof FnHandle && m === '()' && args) {
      this.call(cur, args, line);
      return undefined;
    }
    if (cur instanceof Namespace) {
      const v = this.exportValue(cur.file, m, 0);
      if (args && v instanceof FnHandle) {
        this.call(v, args, line);
        return undefined;
      }
      return v;
    }
    void frame;
    return undefined;
  }

  // ---------------------------------------------------------------- raw SQL

  private raw(sqlArg: Runtime, line: number): void {
    const sql = typeof sqlArg === 'string' ? sqlArg : sqlArg instanceof RawSql ? sqlArg.sql : sqlArg instanceof Opaque ? sqlArg.text : '';
    this.counters.rawStatements++;
    const head = sqlHead(sql);
    const short = head.replace(/\s+/g, ' ').slice(0, 80) + (head.length > 80 ? '...' : '');
    const schemaLike = isSchemaSql(head);
    if (schemaLike) {
      this.counters.rawSchemaStatements++;
      for (const name of rawTableNames(sql)) {
        const p = this.place(undefined, name);
        if (!this.tables.has(this.key(p))) this.rawTables.set(this.key(p), `${this.file?.path ?? '?'}:${line}`);
      }
    }
    // a statement repeated at one place (a loop) is counted each time and reported once
    const severity = schemaLike ? 'warning' : 'info';
    const at = `${this.file?.path ?? ''}:${line}:${severity}`;
    const seen = this.rawAt.get(at);
    if (seen) {
      seen.count++;
      seen.diagnostic.message = `${seen.message} (${seen.count} statements at this place, the first shown)`;
      return;
    }
    const message = schemaLike
      ? `raw SQL is not interpreted (a schema statement: ${short}); the replayed schema may differ from the database here`
      : `raw SQL is not interpreted (${short || 'not known statically'}); no schema effect is assumed`;
    this.diag(severity, 'knex/raw-sql', message, line);
    this.rawAt.set(at, { diagnostic: this.diagnostics[this.diagnostics.length - 1]!, message, count: 1 });
  }

  /** Why a table is missing from the replay (raw SQL created it, or nothing did): the end of a diagnostic's first clause. */
  private missing(p: { ns?: string; name: string }): string {
    const at = this.rawTables.get(this.key(p));
    return at ? `: raw SQL at ${at} created it, and raw SQL is not interpreted` : ' (Knex would fail here)';
  }

  // ---------------------------------------------------------------- names

  private str(v: Runtime, what: string, line: number): string | undefined {
    if (typeof v === 'string') return v;
    if (typeof v === 'number') return String(v);
    this.counters.unresolved++;
    this.warn('knex/name-unknown', `the ${what} is not known statically (${v instanceof Opaque ? v.text : describe(v)}); the call is left out`, line);
    return undefined;
  }

  /** Namespace and name of a table reference: `withSchema` or a dotted `schema.table`. */
  private place(ns: string | undefined, name: string): { ns?: string; name: string } {
    let n = ns;
    let t = name;
    if (!n && name.includes('.')) {
      const i = name.indexOf('.');
      n = name.slice(0, i);
      t = name.slice(i + 1);
    }
    if (n && n === (this.schema ?? defaultNamespace(this.dialect))) n = undefined;
    return { ...(n ? { ns: n } : {}), name: t };
  }

  private key(p: { ns?: string; name: string }): string {
    return p.ns ? `${p.ns}.${p.name}` : p.name;
  }

  private label(p: { ns?: string; name: string }): string {
    return p.ns ? `${p.ns}.${p.name}` : p.name;
  }

  /** A mutable copy of a table for this migration. */
  private mut(key: string): TableState | undefined {
    const t = this.tables.get(key);
    if (!t) return undefined;
    if (this.own.has(t)) return t;
    const c: TableState = {
      ...t,
      columns: t.columns.map((x) => ({ ...x })),
      primaryKey: [...t.primaryKey],
      foreignKeys: t.foreignKeys.map((f) => ({ ...f })),
      uniques: t.uniques.map((u) => ({ ...u })),
    };
    this.own.add(c);
    this.tables.set(key, c);
    return c;
  }

  private freshTableId(p: { ns?: string; name: string }): string {
    const base = tableId(p.name, p.ns);
    // a live table with this name would have stopped the creation; only a renamed one can hold the id
    const used = (id: string): boolean => this.moved.has(id) || this.tables.has(id);
    if (!this.moved.has(base)) return base;
    let n = 2;
    while (used(`${base}~${n}`)) n++;
    this.info('knex/id-taken', `table ${base} is created while a renamed table keeps the id ${base}; the new table's id is ${base}~${n}`);
    return `${base}~${n}`;
  }

  private origin(line: number): Origin {
    return { file: this.file?.path ?? '', ...(line ? { line } : {}) };
  }

  // ---------------------------------------------------------------- schema builder

  private schemaStep(s: SchemaRole, m: string, args: Runtime[] | undefined, line: number): Runtime {
    if (!args) return SCHEMA_NOOP.has(m) ? s : this.unknownMethod('schema builder', m, line);
    switch (m) {
      case 'withSchema': {
        const ns = args[0] === undefined || args[0] === null ? undefined : this.str(args[0], 'schema name', line);
        return new SchemaRole(ns);
      }
      case 'createTable':
      case 'createTableIfNotExists': {
        const name = this.str(args[0], 'table name', line);
        if (name === undefined) return s;
        this.runTable({ mode: 'create', ...this.nsName(s.ns, name), columns: [], statements: [], line }, args[1], line, {
          ifNotExists: m === 'createTableIfNotExists',
        });
        return s;
      }
      case 'createTableLike': {
        const name = this.str(args[0], 'table name', line);
        const like = this.str(args[1], 'table name', line);
        if (name === undefined || like === undefined) return s;
        this.runTable({ mode: 'create', ...this.nsName(s.ns, name), columns: [], statements: [], line }, args[2], line, { like: this.place(s.ns, like) });
        return s;
      }
      case 'table':
      case 'alterTable': {
        const name = this.str(args[0], 'table name', line);
        if (name === undefined) return s;
        this.runTable({ mode: 'alter', ...this.nsName(s.ns, name), columns: [], statements: [], line }, args[1], line, {});
        return s;
      }
      case 'dropTable':
      case 'dropTableIfExists': {
        const name = this.str(args[0], 'table name', line);
        if (name === undefined) return s;
        const p = this.place(s.ns, name);
        const dropped = this.tables.get(this.key(p));
        if (dropped) this.moved.delete(dropped.id);
        if (!this.tables.delete(this.key(p)) && m === 'dropTable') {
          this.warn('knex/no-such-table', `dropTable: table ${this.label(p)} does not exist at this point of the replay${this.missing(p)}; nothing is dropped`, line);
        }
        return s;
      }
      case 'renameTable': {
        const from = this.str(args[0], 'table name', line);
        const to = this.str(args[1], 'table name', line);
        if (from === undefined || to === undefined) return s;
        const pf = this.place(s.ns, from);
        const pt = this.place(s.ns, to);
        const t = this.mut(this.key(pf));
        if (!t) {
          // a table of raw SQL keeps its place under its new name
          const raw = this.rawTables.get(this.key(pf));
          if (raw !== undefined && !this.tables.has(this.key(pt))) this.rawTables.set(this.key(pt), raw);
          this.warn('knex/no-such-table', `renameTable: table ${this.label(pf)} does not exist at this point of the replay${this.missing(pf)}; nothing is renamed`, line);
          return s;
        }
        if (this.tables.has(this.key(pt))) {
          this.warn('knex/table-exists', `renameTable: table ${this.label(pt)} already exists; ${this.label(pf)} is not renamed`, line);
          return s;
        }
        this.tables.delete(this.key(pf));
        t.name = pt.name;
        if (pt.ns) t.namespace = pt.ns;
        else delete t.namespace;
        this.tables.set(this.key(pt), t);
        if (t.id !== tableId(t.name, t.namespace)) this.moved.set(t.id, this.key(pt));
        else this.moved.delete(t.id);
        return s;
      }
      case 'hasTable': {
        const name = this.str(args[0], 'table name', line);
        return name === undefined ? undefined : this.tables.has(this.key(this.place(s.ns, name)));
      }
      case 'hasColumn': {
        const name = this.str(args[0], 'table name', line);
        const col = this.str(args[1], 'column name', line);
        if (name === undefined || col === undefined) return undefined;
        const t = this.tables.get(this.key(this.place(s.ns, name)));
        return !!t && t.columns.some((c) => c.name === col);
      }
      case 'raw':
        this.raw(args[0], line);
        return s;
      case 'createView':
      case 'createViewOrReplace':
      case 'createMaterializedView': {
        const name = this.str(args[0], 'view name', line);
        if (name === undefined) return s;
        const p = this.place(s.ns, name);
        this.views.set(this.key(p), { id: tableId(p.name, p.ns), name: p.name, ...(p.ns ? { namespace: p.ns } : {}), origin: this.origin(line) });
        return s;
      }
      case 'dropView':
      case 'dropViewIfExists':
      case 'dropMaterializedView':
      case 'dropMaterializedViewIfExists': {
        const name = this.str(args[0], 'view name', line);
        if (name !== undefined) this.views.delete(this.key(this.place(s.ns, name)));
        return s;
      }
      case 'renameView': {
        const from = this.str(args[0], 'view name', line);
        const to = this.str(args[1], 'view name', line);
        if (from === undefined || to === undefined) return s;
        const v = this.views.get(this.key(this.place(s.ns, from)));
        if (v) {
          this.views.delete(this.key(this.place(s.ns, from)));
          const p = this.place(s.ns, to);
          this.views.set(this.key(p), { ...v, name: p.name, ...(p.ns ? { namespace: p.ns } : {}) });
        }
        return s;
      }
      case 'dropSchema':
      case 'dropSchemaIfExists': {
        const ns = this.str(args[0], 'schema name', line);
        if (ns !== undefined && args[1] === true) {
          for (const k of this.tables.keysWhere((t) => t.namespace === ns)) {
            this.moved.delete(this.tables.get(k)!.id);
            this.tables.delete(k);
          }
        }
        return s;
      }
      default:
        return SCHEMA_NOOP.has(m) ? s : this.unknownMethod('schema builder', m, line);
    }
  }

  private nsName(ns: string | undefined, name: string): { ns?: string; name: string } {
    return this.place(ns, name);
  }

  private unknownMethod(what: string, m: string, line: number): undefined {
    this.warn('knex/unknown-method', `${m}() is not a method of Knex's ${what} that schema-strata knows; the call is left out`, line);
    return undefined;
  }

  // ---------------------------------------------------------------- table builder

  private runTable(tb: TableBuilder, cb: Runtime, line: number, opts: { ifNotExists?: boolean; like?: { ns?: string; name: string } }): void {
    const key = this.key(tb);
    if (tb.mode === 'alter' && !this.tables.has(key)) {
      this.warn('knex/no-such-table', `table ${this.label(tb)} does not exist at this point of the replay${this.missing(tb)}; its changes are left out`, line);
      return;
    }
    if (tb.mode === 'create' && this.tables.has(key)) {
      if (!opts.ifNotExists) this.warn('knex/table-exists', `createTable: table ${this.label(tb)} already exists at this point of the replay (Knex would fail here); the call is left out`, line);
      return;
    }
    if (cb instanceof FnHandle) {
      const role = new TableRole(tb);
      this.call(cb, [role], cb.fn.line, role);
    } else if (cb !== undefined && !opts.like) {
      this.warn('knex/callback-unknown', `the table callback of ${this.label(tb)} is not known statically; only the call itself is replayed`, line);
    }
    if (tb.mode === 'create') this.commitCreate(tb, opts.like);
    else this.commitAlter(tb);
  }

  private tableStep(tb: TableBuilder, m: string, args: Runtime[] | undefined, line: number): Runtime {
    if (!args) return this.unknownMethod('table builder', m, line);
    if (COLUMN_METHODS.has(m)) {
      let name = args[0];
      if ((name === undefined || name === null) && (m === 'increments' || m === 'bigIncrements' || m === 'bigincrements')) name = 'id';
      const n = this.str(name, 'column name', line);
      const col: ColumnBuilder = {
        method: m, name: n ?? '', args: args.slice(1) as ArgValue[], modifiers: new Map(), alter: false, alterNullable: true, alterType: true, line,
      };
      if (n !== undefined) tb.columns.push(col);
      return new ColumnRole(tb, col);
    }
    if (m === 'timestamps') {
      let [useTimestamps, defaultToNow, camel] = args;
      if (isPlainObject(useTimestamps)) ({ useTimestamps, defaultToNow, useCamelCase: camel } = useTimestamps as Record<string, ArgValue>);
      const method = useTimestamps === true ? 'timestamp' : 'datetime';
      for (const name of camel === true ? ['createdAt', 'updatedAt'] : ['created_at', 'updated_at']) {
        const col: ColumnBuilder = { method, name, args: [], modifiers: new Map(), alter: false, alterNullable: true, alterType: true, line };
        if (defaultToNow === true) {
          col.modifiers.set('nullable', [false]);
          col.modifiers.set('defaultTo', [new RawSql('CURRENT_TIMESTAMP')]);
        }
        tb.columns.push(col);
      }
      return undefined;
    }
    if (m === 'dropTimestamps') {
      if (tb.mode !== 'alter') return this.createOnly(m, line);
      tb.statements.push({ m: 'dropColumn', args: args[0] === true ? ['createdAt', 'updatedAt'] : ['created_at', 'updated_at'], line });
      return new TableRole(tb);
    }
    if (m === 'foreign') {
      const cols = normaliseColumns(args[0]);
      if (!cols) {
        this.str(args[0], 'foreign key column', line);
        return undefined;
      }
      const fk: ForeignData = { columns: cols, line, ...(typeof args[1] === 'string' ? { keyName: args[1] } : {}) };
      tb.statements.push({ m: 'foreign', args: [], fk, line });
      return new ForeignRole(tb, fk);
    }
    if (TABLE_STATEMENTS.has(m)) {
      if (ALTER_ONLY.has(m) && tb.mode !== 'alter') return this.createOnly(m, line);
      tb.statements.push({ m: m === 'dropColumns' ? 'dropColumn' : m, args: args as ArgValue[], line });
      return new TableRole(tb);
    }
    if (TABLE_NOOP.has(m)) return new TableRole(tb);
    return this.unknownMethod('table builder', m, line);
  }

  private createOnly(m: string, line: number): undefined {
    this.warn('knex/alter-only', `${m}() works only on an existing table (table()/alterTable()), not in createTable(); Knex would fail here; the call is left out`, line);
    return undefined;
  }

  private columnStep(r: ColumnRole, m: string, args: Runtime[] | undefined, line: number): Runtime {
    if (!args) return this.unknownMethod('column builder', m, line);
    const col = r.col;
    switch (m) {
      case 'defaultTo':
      case 'default':
      case 'defaultsTo':
        col.modifiers.set('defaultTo', args as ArgValue[]);
        return r;
      case 'nullable':
        col.modifiers.set('nullable', [true]);
        return r;
      case 'notNullable':
      case 'notNull':
        col.modifiers.set('nullable', [false]);
        return r;
      case 'unsigned':
        col.modifiers.set('unsigned', []);
        return r;
      case 'alter': {
        const o = isPlainObject(args[0]) ? (args[0] as Record<string, ArgValue>) : {};
        col.alter = true;
        col.alterNullable = o.alterNullable !== false;
        col.alterType = o.alterType !== false;
        return r;
      }
      case 'primary':
      case 'unique':
        // Knex ignores these on increments columns (lib/schema/columnbuilder.js)
        if (!col.method.toLowerCase().includes('increments')) r.tb.statements.push({ m, args: [[col.name], ...(args as ArgValue[])], line });
        return r;
      case 'references': {
        const fk: ForeignData = { columns: [col.name], line };
        col.fk = fk;
        r.tb.statements.push({ m: 'foreign', args: [], fk, line });
        const fr = new ForeignRole(r.tb, fk, col);
        return this.foreignStep(fr, 'references', args, line);
      }
      case 'inTable':
      case 'on':
      case 'onDelete':
      case 'onUpdate':
      case 'withKeyName':
      case 'deferrable':
        // `.references('id').notNullable().onDelete('CASCADE')`: still the column's foreign key
        if (col.fk) return this.foreignStep(new ForeignRole(r.tb, col.fk, col), m, args, line);
        return this.unknownMethod('column builder', m, line);
      default:
        if (COLUMN_NOOP.has(m)) return r;
        return this.unknownMethod('column builder', m, line);
    }
  }

  private foreignStep(r: ForeignRole, m: string, args: Runtime[] | undefined, line: number): Runtime {
    const fk = r.fk;
    if (args) {
      switch (m) {
        case 'references': {
          const v = args[0];
          if (typeof v === 'string') {
            const pieces = v.split('.');
            // Knex: 'table.column' (two pieces) names the table; anything else is the column
            if (pieces.length === 1) fk.references = [v];
            else {
              fk.inTable = pieces[0];
              fk.references = [pieces[1]!];
            }
          } else {
            const cols = normaliseColumns(v);
            if (cols) fk.references = cols;
            else this.str(v, 'referenced column', line);
          }
          return r;
        }
        case 'inTable':
        case 'on': {
          const t = this.str(args[0], 'referenced table', line);
          if (t !== undefined) fk.inTable = t;
          return r;
        }
        case 'onDelete':
          if (typeof args[0] === 'string') fk.onDelete = args[0];
          return r;
        case 'onUpdate':
          if (typeof args[0] === 'string') fk.onUpdate = args[0];
          return r;
        case 'withKeyName':
          if (typeof args[0] === 'string') fk.keyName = args[0];
          return r;
        case 'deferrable':
          return r;
      }
    }
    if (r.col) return this.columnStep(new ColumnRole(r.tb, r.col), m, args, line);
    return this.unknownMethod('foreign key builder', m, line);
  }

  // ---------------------------------------------------------------- applying a table builder

  private newColumn(cb: ColumnBuilder): { col: ColumnState; incrementsPk: boolean } {
    const info = columnType(cb.method, cb.args, this.dialect, this.enums);
    const nullableMod = cb.modifiers.get('nullable');
    const nullable = info.increments ? false : nullableMod ? nullableMod[0] !== false : true;
    const def = cb.modifiers.get('defaultTo');
    const defaultValue = def ? defaultText(def[0]) : undefined;
    const native = info.native + (cb.modifiers.has('unsigned') ? ' unsigned' : '');
    if (info.nativeEnum && !info.nativeEnum.existing) {
      this.enums.set(info.nativeEnum.schema ? `${info.nativeEnum.schema}.${info.nativeEnum.name}` : info.nativeEnum.name, info.nativeEnum.values ?? []);
    }
    const col: ColumnState = {
      id: cb.name,
      name: cb.name,
      type: info.type,
      native,
      nullable,
      ...(defaultValue !== undefined ? { default: defaultValue } : {}),
      ...(info.generated ? { generated: info.generated } : {}),
      origin: this.origin(cb.line),
    };
    return { col, incrementsPk: !!info.increments?.primaryKey };
  }

  private commitCreate(tb: TableBuilder, like?: { ns?: string; name: string }): void {
    const p = { ...(tb.ns ? { ns: tb.ns } : {}), name: tb.name };
    const t: TableState = {
      id: this.freshTableId(p),
      name: tb.name,
      ...(tb.ns ? { namespace: tb.ns } : {}),
      columns: [],
      primaryKey: [],
      foreignKeys: [],
      uniques: [],
      origin: this.origin(tb.line),
    };
    if (like) {
      const src = this.tables.get(this.key(like));
      if (!src) {
        this.warn('knex/no-such-table', `createTableLike: table ${this.label(like)} does not exist at this point of the replay${this.missing(like)}; ${tb.name} gets only its own columns`, tb.line);
      } else {
        // what each database copies (PostgreSQL: LIKE ... INCLUDING ALL; MySQL: CREATE TABLE ... LIKE; SQLite: CREATE TABLE AS SELECT)
        const sqlite = this.dialect === 'sqlite';
        t.columns = src.columns.map((c) => {
          const copy: ColumnState = { ...c, id: c.name, origin: this.origin(tb.line) };
          if (sqlite) {
            copy.nullable = true;
            delete copy.default;
            delete copy.generated;
          }
          return copy;
        });
        if (!sqlite) {
          t.primaryKey = [...src.primaryKey];
          t.uniques = src.uniques.map((u) => ({ ...u, dbName: u.name ?? knexIndexName('unique', tb.name, u.columns) }));
        }
      }
    }
    const hasPrimary = tb.statements.some((s) => s.m === 'primary');
    const key = this.key(p);
    this.tables.set(key, t);
    this.own.add(t);
    if (t.id !== tableId(t.name, t.namespace)) this.moved.set(t.id, key);
    for (const cb of tb.columns) {
      if (cb.alter) continue;
      if (t.columns.some((c) => c.name === cb.name)) {
        this.warn('knex/column-exists', `column ${cb.name} is declared twice in ${this.label(p)}; the second is left out`, cb.line);
        continue;
      }
      const { col, incrementsPk } = this.newColumn(cb);
      this.pushColumn(t, col);
      if (incrementsPk && !hasPrimary && t.primaryKey.length === 0) t.primaryKey = [col.name];
    }
    this.applyStatements(t, tb);
  }

  private commitAlter(tb: TableBuilder): void {
    const key = this.key(tb);
    const t = this.mut(key)!;
    const label = this.label(tb);
    const hasPrimary = tb.statements.some((s) => s.m === 'primary');
    for (const cb of tb.columns) {
      if (cb.alter) continue;
      if (t.columns.some((c) => c.name === cb.name)) {
        this.warn('knex/column-exists', `column ${cb.name} already exists in ${label} (Knex would fail here); it is not added again`, cb.line);
        continue;
      }
      const { col, incrementsPk } = this.newColumn(cb);
      this.pushColumn(t, col);
      if (incrementsPk && !hasPrimary && t.primaryKey.length === 0) t.primaryKey = [col.name];
    }
    for (const cb of tb.columns) {
      if (!cb.alter) continue;
      const i = t.columns.findIndex((c) => c.name === cb.name);
      if (i < 0) {
        this.warn('knex/no-such-column', `alter(): column ${cb.name} does not exist in ${label} at this point of the replay (Knex would fail here); nothing is altered`, cb.line);
        continue;
      }
      const old = t.columns[i]!;
      const { col } = this.newColumn(cb);
      // .alter() redefines the column: its type, its nullability and its default (Knex's alterColumns)
      const next: ColumnState = {
        ...old,
        type: cb.alterType ? col.type : old.type,
        native: cb.alterType ? col.native : old.native,
        nullable: cb.alterNullable ? col.nullable : old.nullable,
      };
      if (col.default !== undefined) next.default = col.default;
      else delete next.default;
      if (cb.alterType) {
        if (col.generated) next.generated = col.generated;
        else delete next.generated;
      }
      if (t.primaryKey.includes(next.name)) next.nullable = false;
      t.columns[i] = next;
    }
    this.applyStatements(t, tb);
  }

  private applyStatements(t: TableState, tb: TableBuilder): void {
    const label = this.label(tb);
    const has = (c: string): boolean => t.columns.some((x) => x.name === c);
    for (const s of tb.statements) {
      switch (s.m) {
        case 'primary': {
          const cols = normaliseColumns(s.args[0]);
          if (!cols) break;
          const missing = cols.filter((c) => !has(c));
          if (missing.length > 0) {
            this.warn('knex/no-such-column', `primary(): column ${missing.join(', ')} does not exist in ${label}; the key is left out`, s.line);
            break;
          }
          if (t.primaryKey.length > 0 && tb.mode === 'alter') {
            this.warn('knex/primary-exists', `primary(): ${label} already has a primary key (${t.primaryKey.join(', ')}); Knex would fail here; the new key replaces it in the replay`, s.line);
          }
          t.primaryKey = cols;
          for (const c of t.columns) if (cols.includes(c.name)) c.nullable = false;
          break;
        }
        case 'unique': {
          const cols = normaliseColumns(s.args[0]);
          if (!cols) break;
          const missing = cols.filter((c) => !has(c));
          if (missing.length > 0) {
            this.warn('knex/no-such-column', `unique(): column ${missing.join(', ')} does not exist in ${label}; the constraint is left out`, s.line);
            break;
          }
          const o = s.args[1];
          const name = typeof o === 'string' ? o : isPlainObject(o) && typeof o.indexName === 'string' ? o.indexName : undefined;
          if (t.uniques.some((u) => sameList(u.columns, cols))) break;
          t.uniques.push({ columns: cols, ...(name ? { name } : {}), dbName: name ?? knexIndexName('unique', t.name, cols) });
          break;
        }
        case 'foreign':
          this.addForeign(t, s.fk!, label);
          break;
        case 'dropForeign':
        case 'dropForeignIfExists': {
          const cols = normaliseColumns(s.args[0]) ?? [];
          const name = typeof s.args[1] === 'string' ? s.args[1] : undefined;
          const i = name
            ? t.foreignKeys.findIndex((f) => f.dbName === name || f.name === name)
            : t.foreignKeys.findIndex((f) => sameList(f.columns, cols));
          if (i < 0) {
            if (s.m === 'dropForeign') this.warn('knex/no-such-foreign-key', `dropForeign(): ${label} has no foreign key ${name ?? `on ${cols.join(', ')}`} at this point of the replay; nothing is dropped`, s.line);
          } else t.foreignKeys.splice(i, 1);
          break;
        }
        case 'dropPrimary':
        case 'dropPrimaryIfExists':
          if (t.primaryKey.length === 0 && s.m === 'dropPrimary') this.warn('knex/no-primary-key', `dropPrimary(): ${label} has no primary key at this point of the replay`, s.line);
          t.primaryKey = [];
          break;
        case 'dropUnique':
        case 'dropUniqueIfExists': {
          const cols = normaliseColumns(s.args[0]) ?? [];
          const name = typeof s.args[1] === 'string' ? s.args[1] : undefined;
          const i = name ? t.uniques.findIndex((u) => u.dbName === name || u.name === name) : t.uniques.findIndex((u) => sameList(u.columns, cols));
          if (i < 0) {
            if (s.m === 'dropUnique') this.warn('knex/no-such-unique', `dropUnique(): ${label} has no unique constraint ${name ?? `on ${cols.join(', ')}`} at this point of the replay`, s.line);
          } else t.uniques.splice(i, 1);
          break;
        }
        case 'dropColumn': {
          const cols = s.args.flatMap((a) => normaliseColumns(a) ?? []);
          for (const c of cols) {
            const i = t.columns.findIndex((x) => x.name === c);
            if (i < 0) {
              this.warn('knex/no-such-column', `dropColumn(): column ${c} does not exist in ${label} at this point of the replay; nothing is dropped`, s.line);
              continue;
            }
            t.columns.splice(i, 1);
            // the database drops the constraints that use the column
            if (t.primaryKey.includes(c)) t.primaryKey = [];
            t.uniques = t.uniques.filter((u) => !u.columns.includes(c));
            t.foreignKeys = t.foreignKeys.filter((f) => !f.columns.includes(c));
          }
          break;
        }
        case 'renameColumn': {
          const from = this.str(s.args[0], 'column name', s.line);
          const to = this.str(s.args[1], 'column name', s.line);
          if (from === undefined || to === undefined) break;
          const col = t.columns.find((x) => x.name === from);
          if (!col) {
            this.warn('knex/no-such-column', `renameColumn(): column ${from} does not exist in ${label} at this point of the replay; nothing is renamed`, s.line);
            break;
          }
          if (has(to)) {
            this.warn('knex/column-exists', `renameColumn(): column ${to} already exists in ${label}; ${from} is not renamed`, s.line);
            break;
          }
          const i = t.columns.indexOf(col);
          t.columns[i] = { ...col, name: to };
          const ren = (xs: string[]): string[] => xs.map((x) => (x === from ? to : x));
          t.primaryKey = ren(t.primaryKey);
          t.uniques = t.uniques.map((u) => ({ ...u, columns: ren(u.columns) }));
          t.foreignKeys = t.foreignKeys.map((f) => ({ ...f, columns: ren(f.columns) }));
          // foreign keys of other tables (and of this one) that point at the column follow it
          for (const k of this.tables.keysWhere((other) => other.foreignKeys.some((f) => f.refTable === t.id && f.refColumns.includes(from)))) {
            const o = this.tables.get(k) === t ? t : this.mut(k)!;
            o.foreignKeys = o.foreignKeys.map((f) => (f.refTable === t.id ? { ...f, refColumns: ren(f.refColumns) } : f));
          }
          break;
        }
        case 'setNullable':
        case 'dropNullable': {
          const c = this.str(s.args[0], 'column name', s.line);
          if (c === undefined) break;
          const i = t.columns.findIndex((x) => x.name === c);
          if (i < 0) {
            this.warn('knex/no-such-column', `${s.m}(): column ${c} does not exist in ${label} at this point of the replay`, s.line);
            break;
          }
          t.columns[i] = { ...t.columns[i]!, nullable: s.m === 'setNullable' };
          break;
        }
      }
    }
  }

  /** Add a column; a renamed column keeps its first name as id, so a new column of that name gets another id. */
  private pushColumn(t: TableState, col: ColumnState): void {
    if (t.columns.some((c) => c.id === col.name)) {
      let n = 2;
      while (t.columns.some((c) => c.id === `${col.name}~${n}`)) n++;
      col.id = `${col.name}~${n}`;
    }
    t.columns.push(col);
  }

  private addForeign(t: TableState, fk: ForeignData, label: string): void {
    if (!fk.inTable || !fk.references) {
      this.warn('knex/foreign-incomplete', `a foreign key on ${label}.${fk.columns.join(', ')} names no ${fk.inTable ? 'referenced column' : 'referenced table (inTable)'}; Knex creates no constraint`, fk.line);
      return;
    }
    const missing = fk.columns.filter((c) => !t.columns.some((x) => x.name === c));
    if (missing.length > 0) {
      this.warn('knex/no-such-column', `foreign(): column ${missing.join(', ')} does not exist in ${label}; the foreign key is left out`, fk.line);
      return;
    }
    // an unqualified referenced table is looked up in the default schema (the search path), as the database does
    const ref = this.place(undefined, fk.inTable);
    const target = this.tables.get(this.key(ref));
    const refTable = target ? target.id : tableId(ref.name, ref.ns);
    const state: ForeignKeyState = {
      columns: fk.columns,
      refTable,
      refColumns: fk.references,
      ...(fk.onDelete ? { onDelete: action(fk.onDelete) } : {}),
      ...(fk.onUpdate ? { onUpdate: action(fk.onUpdate) } : {}),
      ...(fk.keyName ? { name: fk.keyName } : {}),
      dbName: fk.keyName ?? knexIndexName('foreign', t.name, fk.columns),
    };
    const i = t.foreignKeys.findIndex((f) => sameList(f.columns, fk.columns));
    if (i >= 0) t.foreignKeys[i] = state;
    else t.foreignKeys.push(state);
  }
}

const SCHEMA_CALLS = new Set([
  'schema', 'raw', 'createTable', 'createTableIfNotExists', 'createTableLike', 'alterTable', 'dropTable', 'dropTableIfExists', 'renameTable',
  'timestamps', 'dropTimestamps', 'foreign', ...TABLE_STATEMENTS, ...COLUMN_METHODS,
]);

/** Whether statements may change the schema (builder calls, helpers): else a loop or condition that cannot be decided does not matter. */
export function mayChangeSchema(body: readonly Stmt[]): boolean {
  return body.some((st) => {
    switch (st.k) {
      case 'chain':
        // (a callback handed to any call, `transaction(cb)` say, may hold builder calls of its own;
        // raw SQL known to start with a data statement, `UPDATE ...` say, changes no schema)
        return (st.chain.calls[0]?.m !== '()' && st.chain.calls.some((c) => (SCHEMA_CALLS.has(c.m) && !(c.m === 'raw' && isDataSql(c.args?.[0]))) || c.m === '[]')) || st.chain.calls.some(callbackMayChange);
      case 'if':
        return mayChangeSchema(st.then) || mayChangeSchema(st.else);
      case 'each':
      case 'block':
      case 'loop':
        return mayChangeSchema(st.body);
      case 'switch':
        return st.cases.some((c) => mayChangeSchema(c.body));
      case 'invoke':
        return true;
      case 'opaque':
        // (printing, JSON and arithmetic run no code of the caller's)
        return !NO_SCHEMA_GLOBALS.test(st.callee);
      default:
        return false;
    }
  });
}

/** Calls of globals that never change a schema: `console.log(...)`, `JSON.stringify(...)`, `Math.max(...)`. */
const NO_SCHEMA_GLOBALS = /^(console|JSON|Math)\.[A-Za-z]+$/;

const RAW_TABLE = /\b(?:create\s+(?:(?:global|local)\s+)?(?:(?:temporary|temp|unlogged)\s+)?table\s+(?:if\s+not\s+exists\s+)?|alter\s+table\s+(?:if\s+exists\s+)?(?:only\s+)?(?:[`"\[]?[\w$]+[`"\]]?\s*\.\s*)?[`"\[]?[\w$]+[`"\]]?\s+rename\s+to\s+)((?:[`"\[]?[\w$]+[`"\]]?\s*\.\s*)?[`"\[]?[\w$]+[`"\]]?)/gi;

/** The tables a raw SQL text creates or renames to (`CREATE TABLE x`, `ALTER TABLE y RENAME TO x`), unquoted. */
export function rawTableNames(sql: string): string[] {
  const out: string[] = [];
  for (const m of sql.matchAll(RAW_TABLE)) out.push(m[1]!.replace(/[`"[\]\s]/g, ''));
  return out;
}

/** SQL text without its leading blanks and comments. */
function sqlHead(sql: string): string {
  return sql.replace(/^(\s|--[^\n]*\n|\/\*[\s\S]*?\*\/)+/, '');
}

/** Whether SQL text (its head) starts like a schema statement. */
function isSchemaSql(head: string): boolean {
  const keyword = /^[A-Za-z]+/.exec(head)?.[0]?.toLowerCase() ?? '';
  return ['create', 'alter', 'drop', 'rename', 'comment', 'truncate', 'grant', 'revoke', 'do'].includes(keyword);
}

/** Whether the argument of a `raw` call is SQL whose start is known statically and is no schema statement. */
function isDataSql(a: Arg | undefined): boolean {
  const first = typeof a === 'string' ? a : a !== null && typeof a === 'object' && 'cat' in a && typeof a.cat[0] === 'string' ? a.cat[0] : undefined;
  if (first === undefined) return false;
  const head = sqlHead(first);
  return /^[A-Za-z]+\s/.test(head) && !isSchemaSql(head);
}

/** Whether statements may end their block early (a `return`, `break` or `continue`, also inside an if or a switch's clauses). */
function mayJump(body: readonly Stmt[]): boolean {
  return body.some((st) => st.k === 'return' || st.k === 'break' || st.k === 'continue' || (st.k === 'if' && (mayJump(st.then) || mayJump(st.else))));
}

function callbackMayChange(c: { args?: Arg[] }): boolean {
  return !!c.args?.some((a) => a !== null && typeof a === 'object' && 'cb' in a && mayChangeSchema(a.cb.body));
}

const NO_ASSUMPTIONS: ReadonlyMap<string, AssumedValue> = new Map();
/** Noted among the unknown reads when `knex.client` is read and the run's client is not known. */
const CLIENT_READ = '\u0000client';

/**
 * What a condition-unknown diagnostic adds: the flag that decides the reads it could not know
 * (--knex-client for knex.client, --knex-assume for the longest paths read from undeclared names).
 */
function hint(reads: readonly string[]): string {
  const paths = [...new Set(reads.filter((r) => r !== CLIENT_READ))];
  const longest = paths.filter((p) => !paths.some((q) => q.startsWith(`${p}.`)));
  const says: string[] = [];
  if (reads.includes(CLIENT_READ)) says.push('--knex-client CLIENT');
  for (const p of longest.slice(0, 3)) says.push(`--knex-assume ${p}=VALUE`);
  return says.length > 0 ? ` (to decide it, say what it reads: ${says.join(', ')})` : '';
}

/** A value known statically and compared by identity: a literal, null or undefined. */
function known(x: Runtime): boolean {
  return x === null || x === undefined || typeof x === 'string' || typeof x === 'number' || typeof x === 'boolean';
}

function action(s: string): ReferentialAction | undefined {
  return ACTIONS[s.trim().toLowerCase().replace(/\s+/g, ' ')];
}

function sameList(a: readonly string[], b: readonly string[]): boolean {
  return a.length === b.length && a.every((x, i) => x === b[i]);
}

/** A column or a list of columns, as Knex's `normalizeArr` takes them. */
function normaliseColumns(v: Runtime): string[] | undefined {
  if (typeof v === 'string') return [v];
  if (Array.isArray(v) && v.every((x) => typeof x === 'string')) return v as string[];
  return undefined;
}

function bindParams(frame: Frame, params: readonly Param[], args: readonly Runtime[]): void {
  params.forEach((p, i) => {
    const a = args[i];
    if (typeof p === 'string') {
      frame.vars.set(p, a);
      return;
    }
    for (const [prop, local] of p.props) {
      let v: Runtime;
      if (a instanceof KnexRole) v = prop === 'schema' ? new SchemaRole() : prop === 'raw' ? new KnexRole() : undefined;
      else if (Array.isArray(a)) v = a[Number(prop)];
      else if (isPlainObject(a)) v = a[prop];
      frame.vars.set(local, v);
    }
  });
}

function describe(v: unknown): string {
  if (v === undefined) return 'undefined';
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'object') return 'an object';
  return typeof v;
}

export function valText(v: Val): string {
  if (v === null || typeof v !== 'object') return JSON.stringify(v);
  if ('expr' in v) return v.expr;
  if ('local' in v) return [v.local, ...(v.path ?? [])].join('.');
  if ('imp' in v && v.as !== undefined) return [v.as, ...(v.path ?? [])].join('.');
  if ('imp' in v) return `${v.name === '*' || v.name === 'default' ? '' : v.name + ' from '}'${v.imp}'${v.path ? '.' + v.path.join('.') : ''}`;
  if ('env' in v) return `process.env.${v.env}`;
  if ('arr' in v) return `[${v.arr.map(valText).join(', ')}]`;
  if ('cat' in v) return v.cat.map((x) => (typeof x === 'string' ? x : `\${${valText(x)}}`)).join('');
  if ('keys' in v) return `Object.keys(${valText(v.keys)})`;
  if ('values' in v) return `Object.values(${valText(v.values)})`;
  if ('entries' in v) return `Object.entries(${valText(v.entries)})`;
  if ('at' in v) return `${valText(v.at)}[${valText(v.key)}]`;
  if ('or' in v) return `${valText(v.or[0])} || ${valText(v.or[1])}`;
  if ('when' in v) return v.then === true && v.else === false ? condText(v.when) : `${condText(v.when)} ? ${valText(v.then)} : ${valText(v.else)}`;
  if ('obj' in v) return `{ ${v.obj.map(([k, x]) => (k === '...' ? `...${valText(x)}` : `${k}: ${valText(x)}`)).join(', ')} }`;
  if ('raw' in v) return `raw(${valText(v.raw)})`;
  if ('fn' in v) return `fn.${v.fn}(${v.args.map(valText).join(', ')})`;
  if ('dir' in v) return '__dirname';
  if ('join' in v) return `path.join(${v.join.map(valText).join(', ')})`;
  if ('range' in v) return `${valText(v.range.from)} up to ${valText(v.range.to)}${v.range.inclusive ? ' (included)' : ''}${v.range.step === 1 ? '' : ` by ${v.range.step}`}`;
  return 'undefined';
}

function condText(c: Cond): string {
  if ('unknown' in c) return c.unknown;
  if ('not' in c) return `!${condText(c.not)}`;
  if ('and' in c) return `${condText(c.and[0])} && ${condText(c.and[1])}`;
  if ('or' in c) return `${condText(c.or[0])} || ${condText(c.or[1])}`;
  if ('eq' in c) return `${valText(c.eq[0])} ${c.neg ? '!==' : '==='} ${valText(c.eq[1])}`;
  if ('truthy' in c) return valText(c.truthy);
  if ('includes' in c) return `${valText(c.includes[0])}.includes(${valText(c.includes[1])})`;
  if ('chain' in c) return c.chain.calls.map((x) => x.m).join('.');
  return String(c.lit);
}
