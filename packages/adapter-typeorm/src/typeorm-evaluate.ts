import { posix } from 'node:path';
import type { AssumedValue, Diagnostic } from '@schema-strata/core/extract';
import { TYPEORM_DECORATORS } from './typeorm-config.js';
import { ModuleResolver, nearestTsconfig, tsconfigView, type TsconfigView, type WorkspacePackage } from './typeorm-modules.js';
import type {
  AliasFact, ClassFact, ConstFact, DesignMember, DesignType, EnumFact, FunctionFact, SchemaFact, TypeormFileFacts, Value,
} from './typeorm-parse.js';
import type { ColumnTypeRef } from './typeorm-types.js';

/**
 * Cross-file resolution from facts alone: which declaration a name stands for (through imports,
 * re-exports, barrels and tsconfig path aliases), what a decorator argument evaluates to (literals,
 * enum members, imported constants, spreads, a custom decorator's body with its parameters bound),
 * and which constructor TypeScript's decorator metadata records for a property's type.
 */

export type Sym =
  | { k: 'typeorm'; name: string }
  | { k: 'typeormNs' }
  | { k: 'class'; file: string; c: ClassFact }
  | { k: 'func'; file: string; f: FunctionFact }
  | { k: 'enum'; file: string; e: EnumFact }
  | { k: 'const'; file: string; c: ConstFact }
  | { k: 'alias'; file: string; a: AliasFact }
  | { k: 'schema'; file: string; s: SchemaFact }
  | { k: 'module'; file: string }
  | { k: 'global'; name: string }
  | { k: 'external'; module: string; name: string }
  | { k: 'missing'; spec: string; path: string; name: string }
  | { k: 'unknown'; name: string };

/** An evaluated value. */
export type E =
  | string | number | boolean | null | undefined
  | { $: 'obj'; p: Map<string, E>; open?: string; cast?: true }
  | { $: 'arr'; e: E[] }
  | { $: 'fn'; v: Extract<Value, { k: 'f' }>; env: Env }
  | { $: 'sym'; s: Sym }
  | { $: 'new'; s: Sym; args: E[] }
  | { $: 'deco'; name: string; args: E[]; via?: string }
  | { $: 'decos'; list: Array<Extract<E, { $: 'deco' }>>; fn: string }
  | { $: 'props'; path: string }
  | { $: 'unk'; t: string };

export type DecoE = Extract<E, { $: 'deco' }>;
export type ObjE = Extract<E, { $: 'obj' }>;

export interface Env {
  file: string;
  /** Arguments of the enclosing function values, innermost last. */
  frames: E[][];
  /** Nesting of custom decorator expansions. */
  depth: number;
}

/** The modules whose exports are Node's `process` (`import * as process from 'process'`, `import { env } from 'node:process'`). */
const NODE_PROCESS = new Set(['process', 'node:process']);
/** The dotted path of an export of Node's process module, as read from the global (`*` and `default` are `process` itself). */
function processPath(name: string): string {
  const rest = name.replace(/^(\*|default)(\.|$)/, '');
  return rest ? `process.${rest}` : 'process';
}
const EQUALITY = new Set(['===', '!==', '==', '!=']);
const isScalar = (e: E): e is string | number | boolean | null | undefined => e === null || e === undefined || typeof e === 'string' || typeof e === 'number' || typeof e === 'boolean';

const GLOBALS = new Set([
  'Object', 'String', 'Number', 'Boolean', 'Date', 'Array', 'Buffer', 'Function', 'Symbol', 'BigInt', 'Promise', 'Map', 'Set',
  'JSON', 'Math', 'RegExp', 'Uint8Array', 'ReadonlyArray', 'Record', 'Partial', 'Required', 'Readonly', 'Pick', 'Omit',
  '__dirname', '__filename', 'process', 'require', 'globalThis', 'Reflect',
]);

/** Constructors TypeScript's metadata names for global types (a global interface without a value is an object type). */
const GLOBAL_DESIGN: Record<string, string> = {
  Date: 'Date', String: 'String', Number: 'Number', Boolean: 'Boolean', Object: 'Object', Function: 'Function', Array: 'Array',
  ReadonlyArray: 'Array', Promise: 'Promise', Buffer: 'Buffer', Map: 'Map', Set: 'Set', BigInt: 'BigInt', Symbol: 'Symbol',
  RegExp: 'RegExp', Uint8Array: 'Uint8Array', WeakMap: 'WeakMap', WeakSet: 'WeakSet', Error: 'Error',
};

/**
 * TypeScript's intrinsic string types. Named on a property they are recorded as Object (their
 * generic declaration is not string-like); through a type alias (`type Handle = Lowercase<string>`)
 * the alias's type is a string mapping, recorded as String.
 */
const INTRINSIC_STRING = new Set(['Uppercase', 'Lowercase', 'Capitalize', 'Uncapitalize']);

export const isObjE = (e: E): e is ObjE => typeof e === 'object' && e !== null && e.$ === 'obj';
export const isArrE = (e: E): e is Extract<E, { $: 'arr' }> => typeof e === 'object' && e !== null && e.$ === 'arr';
export const isUnk = (e: E): e is Extract<E, { $: 'unk' }> => typeof e === 'object' && e !== null && e.$ === 'unk';
export const isSymE = (e: E): e is Extract<E, { $: 'sym' }> => typeof e === 'object' && e !== null && e.$ === 'sym';
export const isFnE = (e: E): e is Extract<E, { $: 'fn' }> => typeof e === 'object' && e !== null && e.$ === 'fn';
export const isDecoE = (e: E): e is DecoE => typeof e === 'object' && e !== null && e.$ === 'deco';

interface FileIndex {
  classes: Map<string, ClassFact>;
  functions: Map<string, FunctionFact>;
  enums: Map<string, EnumFact>;
  consts: Map<string, ConstFact>;
  aliases: Map<string, AliasFact>;
  schemas: Map<string, SchemaFact>;
  imports: Map<string, { from: string; imported: string }>;
  /** Local export lists: exported -> local. */
  exportNames: Map<string, string>;
}

const indexMemo = new WeakMap<TypeormFileFacts, FileIndex>();
const exportMemo = new WeakMap<TypeormFileFacts, string>();

/** What a file exports and imports, by name (not what its declarations say). */
export function exportSignature(f: TypeormFileFacts | undefined): string {
  if (!f) return '-';
  let sig = exportMemo.get(f);
  if (sig === undefined) {
    const decl = (kind: string, list: Array<{ name?: string; exported: boolean; isDefault?: boolean }>): string[] =>
      list.map((d) => `${kind}:${d.name ?? ''}:${d.exported ? 1 : 0}${d.isDefault ? 'd' : ''}`);
    sig = JSON.stringify([
      ...decl('c', f.classes), ...decl('f', f.functions), ...decl('e', f.enums), ...decl('k', f.consts), ...decl('a', f.aliases), ...decl('s', f.schemas),
      f.exports, f.imports, f.defaultExport ? 1 : 0,
    ]);
    exportMemo.set(f, sig);
  }
  return sig;
}

function indexOf(facts: TypeormFileFacts): FileIndex {
  let ix = indexMemo.get(facts);
  if (ix) return ix;
  ix = {
    classes: new Map(), functions: new Map(), enums: new Map(), consts: new Map(), aliases: new Map(), schemas: new Map(),
    imports: new Map(), exportNames: new Map(),
  };
  for (const c of facts.classes) if (!ix.classes.has(c.name)) ix.classes.set(c.name, c);
  for (const f of facts.functions) if (!ix.functions.has(f.name)) ix.functions.set(f.name, f);
  for (const e of facts.enums) if (!ix.enums.has(e.name)) ix.enums.set(e.name, e);
  for (const c of facts.consts) if (!ix.consts.has(c.name)) ix.consts.set(c.name, c);
  for (const a of facts.aliases) if (!ix.aliases.has(a.name)) ix.aliases.set(a.name, a);
  for (const s of facts.schemas) if (s.name && !ix.schemas.has(s.name)) ix.schemas.set(s.name, s);
  for (const i of facts.imports) {
    for (const [local, imported] of i.names) ix.imports.set(local, { from: i.from, imported });
    if (i.def) ix.imports.set(i.def, { from: i.from, imported: 'default' });
    if (i.ns) ix.imports.set(i.ns, { from: i.from, imported: '*' });
  }
  for (const ex of facts.exports) if (!ex.from && ex.names) for (const [exported, local] of ex.names) ix.exportNames.set(exported, local);
  indexMemo.set(facts, ix);
  return ix;
}

/**
 * A result computed from some files' facts, with the files it read (and the facts it found there)
 * and the diagnostics it gave: valid in a later version as long as those files' facts are the same.
 */
export interface Tracked<T> {
  value: T;
  /** Files read, with the facts found; `exp:` entries, files whose exported names only were read, with those names. */
  deps: Map<string, TypeormFileFacts | string | undefined>;
  diags: Array<[string, Diagnostic]>;
  /** The last version (a counter of the run) at which it was known to hold. */
  checked?: number;
}

/** What changed since the previous version: lets a result known to hold then be checked against the changes only. */
export interface VersionDelta {
  version: number;
  /** Paths whose facts changed (added and removed paths included). */
  changed: readonly string[];
}

/**
 * The files of one version and the resolution over them. A project lives as long as the paths,
 * options and configuration files of a run stay the same: `advance` moves it to the next version,
 * and every memo it keeps is a tracked result, checked against the files that changed.
 */
export class Project {
  readonly resolver: ModuleResolver;
  diagnostics: Diagnostic[] = [];
  private readonly symMemo = new Map<string, Tracked<Sym>>();
  private readonly constMemo = new Map<ConstFact, Tracked<E>>();
  private readonly constBusy = new Set<ConstFact>();
  private readonly tsViews = new Map<string, TsconfigView | undefined>();
  private readonly reported = new Set<string>();
  private readonly recorders: Array<{ deps: Set<string>; diags: Array<[string, Diagnostic]> }> = [];
  /** While set, files read only to find what they export count as read for their exported names only. */
  private shallowDepth = 0;

  private expKeys: string[];

  /** `packages`: the workspace packages of the version (its package.json inputs), by name. */
  constructor(
    public files: ReadonlyMap<string, TypeormFileFacts>, private delta?: VersionDelta, packages?: ReadonlyMap<string, readonly WorkspacePackage[]>,
    /** Values of reads from undeclared names (`--typeorm-assume`), by dotted path. */
    private readonly assume: ReadonlyMap<string, AssumedValue> = new Map(),
  ) {
    this.expKeys = (delta?.changed ?? []).map((p) => `exp:${p}`);
    // the set of paths is the same for the project's life (module resolution and tsconfig views depend on it)
    const has = (p: string): boolean => this.files.has(p);
    let dirs: Set<string> | undefined;
    const hasDir = (d: string): boolean => {
      if (!dirs) {
        dirs = new Set();
        for (const p of this.files.keys()) for (let x = posix.dirname(p); x !== '.' && !dirs.has(x); x = posix.dirname(x)) dirs.add(x);
      }
      return d === '' || dirs.has(d);
    };
    this.resolver = new ModuleResolver(has, (f) => this.tsconfigFor(f), packages && packages.size > 0 ? { packages: (n) => packages.get(n), hasDir } : undefined);
  }

  /** Move to the next version (same paths, options and configuration files): only the facts of `delta.changed` differ. */
  advance(files: ReadonlyMap<string, TypeormFileFacts>, delta: VersionDelta): void {
    this.files = files;
    this.delta = delta;
    this.expKeys = delta.changed.map((p) => `exp:${p}`);
    this.reported.clear();
    this.diagnostics = [];
  }

  /** Run a computation for its diagnostics only (what it reads is not recorded anywhere). */
  capture(fn: () => void): Array<[string, Diagnostic]> {
    const rec = { deps: new Set<string>(), diags: [] as Array<[string, Diagnostic]> };
    this.recorders.push(rec);
    try {
      fn();
    } finally {
      this.recorders.pop();
    }
    return rec.diags;
  }

  /** The facts of a file, noted as read by every computation under way. */
  fact(file: string): TypeormFileFacts | undefined {
    this.recorders[this.recorders.length - 1]?.deps.add(this.shallowDepth > 0 ? `exp:${file}` : file);
    return this.files.get(file);
  }

  /** Resolve names without depending on more of the files than their exports (a relation's target class, say). */
  shallow<T>(fn: () => T): T {
    this.shallowDepth++;
    try {
      return fn();
    } finally {
      this.shallowDepth--;
    }
  }

  facts(file: string): TypeormFileFacts | undefined {
    return this.fact(file);
  }

  /** Run a computation, noting the files it reads and the diagnostics it gives. */
  track<T>(fn: () => T): Tracked<T> {
    const rec = { deps: new Set<string>(), diags: [] as Array<[string, Diagnostic]> };
    this.recorders.push(rec);
    let value: T;
    try {
      value = fn();
    } finally {
      this.recorders.pop();
    }
    const deps = new Map<string, TypeormFileFacts | string | undefined>();
    for (const p of rec.deps) deps.set(p, p.startsWith('exp:') ? exportSignature(this.files.get(p.slice(4))) : this.files.get(p));
    const t: Tracked<T> = { value, deps, diags: rec.diags, ...(this.delta ? { checked: this.delta.version } : {}) };
    this.replay(t);
    return t;
  }

  /** Whether a tracked result still holds in this version (the files it read have the same facts). */
  valid(t: Tracked<unknown>): boolean {
    const d = this.delta;
    if (d && t.checked === d.version) return true;
    if (d && t.checked === d.version - 1) {
      for (let i = 0; i < d.changed.length; i++) {
        const p = d.changed[i]!;
        if (t.deps.has(p)) return false;
        const e = t.deps.get(this.expKeys[i]!);
        if (e !== undefined && e !== exportSignature(this.files.get(p))) return false;
      }
    } else {
      for (const [p, f] of t.deps) {
        if (p.startsWith('exp:') ? exportSignature(this.files.get(p.slice(4))) !== f : this.files.get(p) !== f) return false;
      }
    }
    if (d) t.checked = d.version;
    return true;
  }

  /** Take over a tracked result: its files count as read, its diagnostics as given. */
  replay(t: Tracked<unknown>): void {
    const r = this.recorders[this.recorders.length - 1];
    if (r) {
      for (const p of t.deps.keys()) r.deps.add(this.shallowDepth > 0 && !p.startsWith('exp:') ? `exp:${p}` : p);
      r.diags.push(...t.diags);
    } else for (const [k, d] of t.diags) this.report(k, d);
  }

  /** Count a file as read by the computation under way (without reading it). */
  touch(file: string): void {
    this.recorders[this.recorders.length - 1]?.deps.add(file);
  }

  tsconfigFor(file: string): TsconfigView | undefined {
    const dir = posix.dirname(file);
    if (this.tsViews.has(dir)) return this.tsViews.get(dir);
    const p = nearestTsconfig(file, (q) => this.files.has(q));
    const v = p ? tsconfigView(p, (q) => this.files.get(q)?.tsconfig, (q) => this.files.has(q)) : undefined;
    this.tsViews.set(dir, v);
    return v;
  }

  /** One diagnostic per key (a place and a problem) and version. */
  report(key: string, d: Diagnostic): void {
    const r = this.recorders[this.recorders.length - 1];
    if (r) {
      r.diags.push([key, d]);
      return;
    }
    if (this.reported.has(key)) return;
    this.reported.add(key);
    this.diagnostics.push(d);
  }

  // ---- symbols

  private declared(file: string, name: string): Sym | undefined {
    const f = this.fact(file);
    if (!f) return undefined;
    const ix = indexOf(f);
    const c = ix.classes.get(name);
    if (c) return { k: 'class', file, c };
    const fn = ix.functions.get(name);
    if (fn) return { k: 'func', file, f: fn };
    const en = ix.enums.get(name);
    if (en) return { k: 'enum', file, e: en };
    const s = ix.schemas.get(name);
    if (s) return { k: 'schema', file, s };
    const co = ix.consts.get(name);
    if (co) return { k: 'const', file, c: co };
    const al = ix.aliases.get(name);
    if (al) return { k: 'alias', file, a: al };
    return undefined;
  }

  private fromModule(file: string, spec: string, imported: string, depth: number): Sym {
    const r = this.resolver.resolve(file, spec);
    switch (r.kind) {
      case 'typeorm':
        return imported === '*' || imported === 'default' ? { k: 'typeormNs' } : { k: 'typeorm', name: imported };
      case 'file':
        return imported === '*' ? { k: 'module', file: r.path } : this.exportOf(r.path, imported, depth + 1);
      case 'missing':
        return { k: 'missing', spec, path: r.path, name: imported };
      default:
        return { k: 'external', module: r.module, name: imported };
    }
  }

  /** What a name stands for in a file: its own declarations, then its imports, then globals. */
  symbol(file: string, name: string): Sym {
    // a lookup for exports only is kept apart: its result does not stand for the declarations' contents
    const key = `${this.shallowDepth > 0 ? 1 : 0}\u0000${file}\u0000${name}`;
    let s = this.symMemo.get(key);
    if (s && this.valid(s)) this.replay(s);
    else {
      s = this.track(() => this.symbolUncached(file, name, 0));
      this.symMemo.set(key, s);
    }
    return s.value;
  }

  private symbolUncached(file: string, name: string, depth: number): Sym {
    const local = this.declared(file, name);
    if (local) return local;
    const f = this.fact(file);
    const imp = f ? indexOf(f).imports.get(name) : undefined;
    if (imp) return this.fromModule(file, imp.from, imp.imported, depth);
    if (GLOBALS.has(name)) return { k: 'global', name };
    return { k: 'unknown', name };
  }

  /** What a module exports under a name (declarations, export lists, re-exports, `export *`). */
  exportOf(file: string, name: string, depth = 0): Sym {
    if (depth > 16) return { k: 'unknown', name };
    const f = this.fact(file);
    if (!f) return { k: 'missing', spec: file, path: file, name };
    const ix = indexOf(f);
    if (name === 'default') {
      const c = f.classes.find((x) => x.isDefault);
      if (c) return { k: 'class', file, c };
      const fn = f.functions.find((x) => x.isDefault);
      if (fn) return { k: 'func', file, f: fn };
      const s = f.schemas.find((x) => x.isDefault);
      if (s) return { k: 'schema', file, s };
      if (f.defaultExport) {
        if (f.defaultExport.k === 'r' && !f.defaultExport.n.includes('.')) return this.symbolUncached(file, f.defaultExport.n, depth + 1);
        return { k: 'const', file, c: { name: 'default', line: 1, exported: true, value: f.defaultExport } };
      }
    } else {
      const local = ix.exportNames.get(name);
      if (local !== undefined) return this.symbolUncached(file, local, depth + 1);
      const decl = this.declared(file, name);
      if (decl && exportedDecl(decl)) return decl;
    }
    for (const ex of f.exports) {
      if (!ex.from) continue;
      if (ex.names) {
        const hit = ex.names.find(([exported]) => exported === name);
        if (hit) return this.fromModule(file, ex.from, hit[1], depth);
      } else if (ex.ns) {
        if (ex.ns === name) return this.fromModule(file, ex.from, '*', depth);
      } else if (name !== 'default') {
        const r = this.resolver.resolve(file, ex.from);
        if (r.kind === 'typeorm') {
          if ((TYPEORM_DECORATORS as readonly string[]).includes(name) || /^(BaseEntity|DefaultNamingStrategy|EntitySchema)$/.test(name)) return { k: 'typeorm', name };
          continue;
        }
        if (r.kind !== 'file') continue;
        const s = this.exportOf(r.path, name, depth + 1);
        if (s.k !== 'unknown' && s.k !== 'missing') return s;
      }
    }
    return { k: 'unknown', name };
  }

  /** Every class or schema a module exports (for `Object.values(entities)` of a barrel). */
  exportedEntities(file: string, depth = 0, seen = new Set<string>()): Sym[] {
    if (depth > 16 || seen.has(file)) return [];
    seen.add(file);
    const f = this.fact(file);
    if (!f) return [];
    const out: Sym[] = [];
    for (const c of f.classes) if (c.exported) out.push({ k: 'class', file, c });
    for (const s of f.schemas) if (s.exported) out.push({ k: 'schema', file, s });
    for (const ex of f.exports) {
      if (!ex.from) {
        for (const [, local] of ex.names ?? []) {
          const s = this.symbol(file, local);
          if (s.k === 'class' || s.k === 'schema') out.push(s);
        }
        continue;
      }
      const r = this.resolver.resolve(file, ex.from);
      if (r.kind !== 'file') continue;
      if (ex.names) {
        for (const [, imported] of ex.names) {
          const s = this.exportOf(r.path, imported, depth + 1);
          if (s.k === 'class' || s.k === 'schema') out.push(s);
        }
      } else if (!ex.ns) out.push(...this.exportedEntities(r.path, depth + 1, seen));
    }
    return out;
  }

  // ---- evaluation

  /** Resolve a dotted name in a file: `Role.Admin`, `orm.Column`, `ns.User`. */
  dotted(file: string, name: string): E {
    if (name === '__dirname') return '/' + (posix.dirname(file) === '.' ? '' : posix.dirname(file));
    const parts = name.split('.');
    let cur: E = this.symToE(this.symbol(file, parts[0]!));
    for (const p of parts.slice(1)) cur = this.member(cur, p);
    // what cannot be read is named as written (`nativeValues.jsonType`), not by the member that failed
    return parts.length > 1 && isUnk(cur) ? { $: 'unk', t: name } : cur;
  }

  symToE(s: Sym): E {
    if (s.k === 'const') return this.constValue(s.c, s.file);
    return { $: 'sym', s };
  }

  constValue(c: ConstFact, file: string): E {
    const got = this.constMemo.get(c);
    if (got && this.valid(got)) {
      this.replay(got);
      return got.value;
    }
    if (this.constBusy.has(c)) return { $: 'unk', t: c.name };
    this.constBusy.add(c);
    // a constant's value depends on its file's contents, whatever asked for it
    const shallow = this.shallowDepth;
    this.shallowDepth = 0;
    let t: Tracked<E>;
    try {
      t = this.track(() => {
        this.fact(file);
        return this.eval(c.value, { file, frames: [], depth: 0 });
      });
    } finally {
      this.shallowDepth = shallow;
    }
    this.constBusy.delete(c);
    this.constMemo.set(c, t);
    return t.value;
  }

  member(o: E, name: string): E {
    if (o === undefined || o === null) return { $: 'unk', t: `.${name}` };
    if (typeof o !== 'object') {
      if (typeof o === 'string' && name === 'length') return o.length;
      return { $: 'unk', t: `.${name}` };
    }
    switch (o.$) {
      case 'obj':
        if (o.p.has(name)) return o.p.get(name);
        return o.open ? { $: 'unk', t: `${o.open}.${name}` } : undefined;
      case 'arr':
        return name === 'length' ? o.e.length : { $: 'unk', t: `.${name}` };
      case 'props':
        return { $: 'props', path: o.path ? `${o.path}.${name}` : name };
      case 'sym': {
        const s = o.s;
        if (s.k === 'enum') {
          const m = s.e.members.find(([n]) => n === name);
          return m ? (m[1] ?? { $: 'unk', t: `${s.e.name}.${name}` }) : undefined;
        }
        if (s.k === 'typeormNs') return { $: 'sym', s: { k: 'typeorm', name } };
        if (s.k === 'module') return this.symToE(this.exportOf(s.file, name));
        if (s.k === 'global' || (s.k === 'external' && NODE_PROCESS.has(s.module))) {
          // a read of process.env and the like (also through `import * as process from 'process'`)
          const path = `${s.k === 'global' ? s.name : processPath(s.name)}.${name}`;
          if (this.assume.has(path)) return this.assume.get(path);
        }
        if (s.k === 'global') return { $: 'sym', s: { k: 'global', name: `${s.name}.${name}` } };
        if (s.k === 'external') return { $: 'sym', s: { k: 'external', module: s.module, name: `${s.name}.${name}` } };
        if (s.k === 'missing') return o;
        if (s.k === 'class') {
          const st = s.c.statics?.find(([n]) => n === name);
          if (st) {
            // the value depends on the class's file, however the class was found (as a constant's does)
            const shallow = this.shallowDepth;
            this.shallowDepth = 0;
            try {
              this.fact(s.file);
              return this.eval(st[1], { file: s.file, frames: [], depth: 0 });
            } finally {
              this.shallowDepth = shallow;
            }
          }
        }
        return { $: 'unk', t: `${symName(s)}.${name}` };
      }
      default:
        return { $: 'unk', t: `.${name}` };
    }
  }

  eval(v: Value, env: Env): E {
    switch (v.k) {
      case 'l':
        return v.v;
      case 'u':
        return undefined;
      case 'o': {
        const p = new Map<string, E>();
        let open: string | undefined;
        for (const [k, x] of v.p) {
          if (k !== null) {
            p.set(k, this.eval(x, env));
            continue;
          }
          const s = this.eval(x, env);
          if (isObjE(s)) {
            for (const [sk, sv] of s.p) p.set(sk, sv);
            if (s.open) open = s.open;
          } else if (s !== undefined && s !== null) open = isUnk(s) ? s.t : '...';
        }
        const obj: ObjE = open ? { $: 'obj', p, open } : { $: 'obj', p };
        if (v.cast) obj.cast = true;
        return obj;
      }
      case 'a': {
        const e: E[] = [];
        for (const x of v.e) {
          if (x.k === 's') {
            const s = this.eval(x.v, env);
            if (isArrE(s)) e.push(...s.e);
            else e.push({ $: 'unk', t: `...${isUnk(s) ? s.t : ''}` });
          } else e.push(this.eval(x, env));
        }
        return { $: 'arr', e };
      }
      case 's':
        return this.eval(v.v, env);
      case 'f':
        return { $: 'fn', v, env };
      case 'r':
        return this.dotted(env.file, v.n);
      case 'p': {
        const frame = env.frames[env.frames.length - 1 - v.d];
        let cur: E = frame ? frame[v.i] : { $: 'unk', t: 'parameter' };
        for (const a of v.a ?? []) cur = this.member(cur, a);
        return cur;
      }
      case 'm':
        return this.member(this.eval(v.o, env), v.n);
      case 'c': {
        const applied = this.appliedEach(v.c, env);
        if (applied) return applied;
        const callee = this.eval(v.c, env);
        const args = this.args(v.a, env);
        return this.call(callee, args, env);
      }
      case 'n': {
        const callee = this.eval(v.c, env);
        if (isSymE(callee)) return { $: 'new', s: callee.s, args: this.args(v.a, env) };
        return { $: 'unk', t: 'new' };
      }
      case 'b': {
        const l = this.eval(v.l, env);
        if (v.o === '??') return l === undefined || l === null ? this.eval(v.r, env) : l;
        if (v.o === '||') return isUnk(l) ? l : l ? l : this.eval(v.r, env);
        if (v.o === '&&') return isUnk(l) ? l : l ? this.eval(v.r, env) : l;
        const r = this.eval(v.r, env);
        if (EQUALITY.has(v.o)) {
          // a comparison of values known here (`process.env.NODE_ENV === 'test'` with --typeorm-assume)
          if (!isScalar(l) || !isScalar(r)) return { $: 'unk', t: v.t ?? v.o };
          const same = v.o === '===' || v.o === '!==' ? l === r : l == r;
          return v.o === '===' || v.o === '==' ? same : !same;
        }
        if ((typeof l === 'string' || typeof l === 'number') && (typeof r === 'string' || typeof r === 'number')) return (l as string) + (r as string);
        return { $: 'unk', t: '+' };
      }
      case 'q': {
        const c = this.eval(v.c, env);
        if (typeof c === 'object' && c !== null && c.$ === 'unk') return { $: 'unk', t: '?:' };
        // a member of a global or of a package's value (`process.env.X`, `settings.useSnake`) is
        // not known: it may be falsy
        if (isSymE(c) && (c.s.k === 'global' || c.s.k === 'external') && c.s.name.includes('.')) return { $: 'unk', t: '?:' };
        if (typeof c === 'object' && c !== null) return this.eval(v.t, env);
        return c ? this.eval(v.t, env) : this.eval(v.f, env);
      }
      case 't': {
        let s = '';
        for (const q of v.q) {
          if (typeof q === 'string') s += q;
          else {
            const x = this.eval(q, env);
            if (typeof x === 'string' || typeof x === 'number' || typeof x === 'boolean') s += String(x);
            else return { $: 'unk', t: '`...`' };
          }
        }
        return s;
      }
      case 'x':
        return { $: 'unk', t: v.t };
    }
  }

  /**
   * `decorators.forEach((d) => d(target, key))` in a custom decorator: the TypeORM decorators of
   * a list it was given, applied in the list's order (what the callback does with each is not
   * followed; a wrapper that loops over decorators applies them).
   */
  private appliedEach(c: Value, env: Env): E | undefined {
    let list: Value | undefined;
    if (c.k === 'm' && c.n === 'forEach') list = c.o;
    else if (c.k === 'p' && c.a && c.a[c.a.length - 1] === 'forEach') list = { ...c, a: c.a.slice(0, -1) };
    else if (c.k === 'r' && c.n.endsWith('.forEach')) list = { k: 'r', n: c.n.slice(0, -'.forEach'.length) };
    if (!list) return undefined;
    const arr = this.eval(list, env);
    if (!isArrE(arr) || arr.e.length === 0 || !arr.e.every(isDecoE)) return undefined;
    return { $: 'decos', list: arr.e, fn: 'forEach' };
  }

  private args(list: Value[], env: Env): E[] {
    const out: E[] = [];
    for (const a of list) {
      if (a.k === 's') {
        const s = this.eval(a.v, env);
        if (isArrE(s)) out.push(...s.e);
        else out.push({ $: 'unk', t: '...' });
      } else out.push(this.eval(a, env));
    }
    return out;
  }

  /** Call a function value: a closure, a TypeORM decorator, a custom decorator, or a few well-known helpers. */
  call(callee: E, args: E[], env: Env): E {
    if (isFnE(callee)) {
      if (!callee.v.r || callee.env.frames.length > 32) return { $: 'unk', t: callee.v.t };
      const r = this.eval(callee.v.r, { ...callee.env, frames: [...callee.env.frames, args] });
      return r;
    }
    if (!isSymE(callee)) return { $: 'unk', t: 'call' };
    const s = callee.s;
    if (s.k === 'typeorm' && (TYPEORM_DECORATORS as readonly string[]).includes(s.name)) return { $: 'deco', name: s.name, args };
    if (s.k === 'func') return this.expand(s.f, s.file, args, env.depth);
    if (s.k === 'global') {
      const a0 = args[0];
      if (s.name === 'Object.values' || s.name === 'Object.keys') {
        if (isSymE(a0) && a0.s.k === 'enum') {
          const en = a0.s.e;
          if (s.name === 'Object.keys') return { $: 'arr', e: enumObjectKeys(en) };
          return { $: 'arr', e: enumObjectKeys(en).map((k) => enumObjectValue(en, k)) };
        }
        if (isObjE(a0)) return { $: 'arr', e: s.name === 'Object.keys' ? [...a0.p.keys()] : [...a0.p.values()] };
        if (isSymE(a0) && a0.s.k === 'module') return { $: 'arr', e: this.exportedEntities(a0.s.file).map((x) => this.symToE(x)) };
      }
      if (s.name === 'String' && args.length === 1 && (typeof a0 === 'number' || typeof a0 === 'string')) return String(a0);
      return { $: 'unk', t: `${s.name}()` };
    }
    if (s.k === 'external' && /^(node:)?path$/.test(s.module) && /(^|\.)(join|resolve)$/.test(s.name)) return pathCall(s.name.endsWith('resolve'), args);
    return { $: 'unk', t: `${symName(s)}()` };
  }

  /** A custom decorator's call: evaluate every call in its body with its parameters bound; keep the TypeORM decorators that come out. */
  expand(f: FunctionFact, file: string, args: E[], depth: number): E {
    if (depth >= 4) return { $: 'unk', t: `${f.name}()` };
    const bound = [...args];
    (f.defaults ?? []).forEach((d, i) => {
      if (d && bound[i] === undefined) bound[i] = this.eval(d, { file, frames: [], depth: depth + 1 });
    });
    const env: Env = { file, frames: [bound], depth: depth + 1 };
    const list: DecoE[] = [];
    for (const c of f.calls) {
      const e = this.eval(c, env);
      if (isDecoE(e)) list.push({ ...e, via: e.via ?? f.name });
      else if (typeof e === 'object' && e !== null && e.$ === 'decos') list.push(...e.list);
    }
    if (list.length === 0 && f.returns) {
      const r = this.eval(f.returns, env);
      if (isDecoE(r)) list.push(r);
      else if (typeof r === 'object' && r !== null && r.$ === 'decos') list.push(...r.list);
      // a helper that returns a value (`type: dbType('timestamptz')`): its value, unless it has
      // several returns (which one runs is decided at run time: read as `dbType()`, not a value)
      else if (!f.branched) return r;
    }
    return { $: 'decos', list, fn: f.name };
  }

  // ---- design types (what emitDecoratorMetadata records)

  /**
   * The constructor TypeScript records as a property's `design:type`, under the file's
   * strictNullChecks: as `serializeTypeNode` does, with references resolved from facts.
   */
  designOf(dt: DesignType, file: string, strict: boolean, depth = 0): DesignResult {
    switch (dt.k) {
      case 'c':
        return { t: { ctor: dt.n } };
      case 'v':
        return { t: undefined };
      case 'r':
        return this.designRef(dt.n, file, strict, depth, !!dt.o);
      case 'u':
        return this.designUnion(dt.m, !!dt.i, file, strict, depth);
    }
  }

  private designRef(name: string, file: string, strict: boolean, depth: number, inConditional: boolean): DesignResult {
    if (depth > 12) return { t: { ctor: 'Object' } };
    const parts = name.split('.');
    let s: Sym = this.symbol(file, parts[0]!);
    for (const p of parts.slice(1)) {
      if (s.k === 'module') s = this.exportOf(s.file, p);
      else if (s.k === 'typeormNs') s = { k: 'typeorm', name: p };
      else {
        s = { k: 'unknown', name };
        break;
      }
    }
    switch (s.k) {
      case 'class':
        return { t: { ctor: `class:${s.c.name}` } };
      case 'enum': {
        const vals = s.e.members.map(([, v]) => v);
        if (vals.length > 0 && vals.every((v) => typeof v === 'string')) return { t: { ctor: 'String' } };
        if (vals.every((v) => typeof v === 'number' || v === null)) return { t: { ctor: 'Number' } };
        return { t: { ctor: 'Object' } };
      }
      case 'alias': {
        const d = s.a.design;
        if (d.k === 'r' && INTRINSIC_STRING.has(d.n) && this.symbol(s.file, d.n).k === 'unknown') return { t: { ctor: 'String' } };
        return this.designOf(d, s.file, strict, depth + 1);
      }
      case 'global': {
        const g = GLOBAL_DESIGN[s.name];
        return { t: { ctor: g ?? 'Object' } };
      }
      case 'unknown':
        if (GLOBAL_DESIGN[name]) return { t: { ctor: GLOBAL_DESIGN[name]! } };
        if (INTRINSIC_STRING.has(name)) return { t: { ctor: 'Object' } };
        return { t: { ctor: 'Object' }, unresolved: name };
      default:
        return { t: { ctor: 'Object' }, unresolved: inConditional ? undefined : name };
    }
  }

  private designUnion(members: DesignMember[], isIntersection: boolean, file: string, strict: boolean, depth: number): DesignResult {
    let serialized: ColumnTypeRef | undefined;
    let seen = false;
    let nullish = false;
    let unresolved: string | undefined;
    const OBJECT = { ctor: 'Object' };
    for (const m of members) {
      if (m.k === 'never') {
        if (isIntersection) return { t: undefined };
        continue;
      }
      if (m.k === 'unknown') {
        if (!isIntersection) return { t: OBJECT };
        continue;
      }
      if (m.k === 'any') return { t: OBJECT };
      if (m.k === 'null' || m.k === 'undef') {
        nullish = true;
        if (!strict) continue;
      }
      const one = m.k === 'null' || m.k === 'undef' ? { t: undefined } : this.designOf(m as DesignType, file, strict, depth + 1);
      if (one.unresolved) unresolved = one.unresolved;
      if (one.t && typeof one.t === 'object' && one.t.ctor === 'Object') return withNonNull({ t: OBJECT, unresolved }, members, this, file, depth, nullish && strict);
      if (seen) {
        const same = (serialized === undefined && one.t === undefined) || (serialized !== undefined && one.t !== undefined && sameRef(serialized, one.t));
        if (!same) return withNonNull({ t: OBJECT, unresolved }, members, this, file, depth, nullish && strict);
      } else {
        serialized = one.t;
        seen = true;
      }
    }
    return { t: serialized, ...(unresolved ? { unresolved } : {}) };
  }
}

function sameRef(a: ColumnTypeRef, b: ColumnTypeRef): boolean {
  return typeof a === 'string' ? a === b : typeof b === 'object' && a.ctor === b.ctor;
}

/** When strictNullChecks turned `T | null` into Object, what the type would be without the null members. */
function withNonNull(r: DesignResult, members: DesignMember[], p: Project, file: string, depth: number, applies: boolean): DesignResult {
  if (!applies) return r;
  const rest = members.filter((m) => m.k !== 'null' && m.k !== 'undef');
  if (rest.length === 0) return r;
  const alt = rest.length === 1 ? p.designOf(rest[0] as DesignType, file, true, depth + 1) : p.designOf({ k: 'u', m: rest }, file, true, depth + 1);
  if (alt.t && !(typeof alt.t === 'object' && alt.t.ctor === 'Object')) return { ...r, strictNull: alt.t };
  return r;
}

export interface DesignResult {
  t: ColumnTypeRef | undefined;
  /** A type name that could not be resolved (recorded as Object, as TypeScript's fallback does at run time). */
  unresolved?: string;
  /** Under strictNullChecks, the type without `null`/`undefined` (TypeScript records Object for the union). */
  strictNull?: ColumnTypeRef;
}

/** The declaration a symbol stands for, when it is one of the file's own. */
function declOf(s: Sym): { name?: string; exported: boolean } | undefined {
  switch (s.k) {
    case 'class':
      return s.c;
    case 'func':
      return s.f;
    case 'enum':
      return s.e;
    case 'const':
      return s.c;
    case 'alias':
      return s.a;
    case 'schema':
      return s.s;
    default:
      return undefined;
  }
}

function exportedDecl(s: Sym): boolean {
  return declOf(s)?.exported ?? false;
}

export function symName(s: Sym): string {
  const d = declOf(s);
  if (d) return d.name ?? 'schema';
  return 'name' in s ? s.name : s.k;
}

/** Keys of a TypeScript enum object at run time: member names, plus reverse-mapped numbers. */
function enumObjectKeys(en: EnumFact): string[] {
  const keys = en.members.map(([n]) => n);
  const reverse = en.members.filter(([, v]) => typeof v === 'number').map(([, v]) => String(v));
  return [...reverse.sort((a, b) => Number(a) - Number(b)), ...keys];
}

function enumObjectValue(en: EnumFact, key: string): E {
  const m = en.members.find(([n]) => n === key);
  if (m) return m[1] ?? { $: 'unk', t: key };
  const r = en.members.find(([, v]) => String(v) === key);
  return r ? r[0] : undefined;
}

/** The values TypeORM takes from an enum object (`ColumnMetadata`: non-numeric keys, functions left out). */
export function enumValuesOf(e: E): Array<string | number> | undefined {
  if (isArrE(e)) return e.e.filter((x): x is string | number => typeof x === 'string' || typeof x === 'number');
  if (isSymE(e) && e.s.k === 'enum') {
    const en = e.s.e;
    return enumObjectKeys(en)
      .filter((k) => Number.isNaN(Number(k)))
      .map((k) => enumObjectValue(en, k))
      .filter((x): x is string | number => typeof x === 'string' || typeof x === 'number');
  }
  if (isObjE(e)) return [...e.p.values()].filter((x): x is string | number => typeof x === 'string' || typeof x === 'number');
  return undefined;
}

function pathCall(resolve: boolean, args: E[]): E {
  const parts: string[] = [];
  for (const a of args) {
    if (typeof a !== 'string') return { $: 'unk', t: 'path' };
    parts.push(a);
  }
  if (resolve) {
    let at = 0;
    parts.forEach((p, i) => {
      if (p.startsWith('/')) at = i;
    });
    return posix.join(...parts.slice(at));
  }
  return posix.join(...parts);
}

// ---- plain-value readers for decorator options

export function str(e: E): string | undefined {
  return typeof e === 'string' ? e : undefined;
}

export function numOf(e: E): number | undefined {
  if (typeof e === 'number') return e;
  if (typeof e === 'string' && /^\d+$/.test(e)) return Number(e);
  return undefined;
}

export function get(o: E, key: string): E {
  return isObjE(o) ? o.p.get(key) : undefined;
}

/** Text of a value for messages and for defaults written as expressions. */
export function textOf(e: E): string {
  if (e === undefined) return 'undefined';
  if (e === null) return 'null';
  if (typeof e !== 'object') return typeof e === 'string' ? JSON.stringify(e) : String(e);
  switch (e.$) {
    case 'unk':
      return e.t;
    case 'fn':
      return e.v.t;
    case 'sym':
      return symName(e.s);
    case 'arr':
      return `[${e.e.map(textOf).join(', ')}]`;
    case 'obj':
      return `{ ${[...e.p].map(([k, v]) => `${k}: ${textOf(v)}`).join(', ')} }`;
    case 'props':
      return e.path;
    case 'decos':
      return `${e.fn}()`;
    default:
      return e.$;
  }
}
