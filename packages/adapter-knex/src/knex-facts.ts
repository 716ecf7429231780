/**
 * The facts of one file, as `parseFile` extracts them from its syntax tree: plain JSON, cached
 * by blob id, depending on the text only (never on the path or on other files). They are a
 * small intermediate form of the code that matters to the schema: the statements of `up()`
 * (and of helper functions), the values of constants, the exports and the relative imports.
 * `knex-assemble.ts` replays them; nothing here knows what a builder method means.
 */

/** A value, as far as the syntax tree tells it. Literals are themselves. */
export type Val =
  | string
  | number
  | boolean
  | null
  | { arr: Val[] }
  | { obj: Array<[string, Val]> }
  /**
   * A binding imported from another file of the project: its specifier, export name ('default',
   * '*') and a member path. For a package (a bare specifier), `as` is the local name: the package
   * is followed when it is one of the repository's own (a workspace package), else the value is
   * the name's, as for a name the file never declares.
   */
  | { imp: string; name: string; path?: string[]; as?: string }
  /** A variable of the enclosing function (a parameter or a loop variable), bound at replay. */
  | { local: string; path?: string[] }
  /** String concatenation or a template literal. */
  | { cat: Val[] }
  /** `knex.raw(sql, bindings)` used as a value (a default, say). */
  | { raw: Val }
  /** `knex.fn.now()`, `knex.fn.uuid()`. */
  | { fn: string; args: Val[] }
  /** `obj[key]` or `obj.key` on a value known only at replay. */
  | { at: Val; key: Val }
  /** Object.keys / Object.values / Object.entries of a value. */
  | { keys: Val }
  | { values: Val }
  | { entries: Val }
  /** `a || b`, `a ?? b`. */
  | { or: [Val, Val] }
  /** `c ? a : b` with a condition known only at replay. */
  | { when: Cond; then: Val; else: Val }
  /** `__dirname`, `import.meta.dirname` (knexfiles): the file's own directory. */
  | { dir: true }
  /** `path.join(...)`, `path.resolve(...)` (knexfiles). */
  | { join: Val[] }
  /** `process.env.NAME`: not known statically. */
  | { env: string }
  /** The numbers a counted `for` loop goes through (`for (let i = from; i < to; i += step)`; `<=` when `inclusive`). */
  | { range: { from: Val; to: Val; step: number; inclusive?: true } }
  /** `undefined`. */
  | { undef: true }
  /** Not known statically: the source text. */
  | { expr: string };

/** A function: its parameter names (destructuring as `pattern`) and its statements. */
export interface FnIR {
  params: Param[];
  body: Stmt[];
  /** True for `function` expressions (their `this` is bound by Knex to the table builder). */
  usesThis?: boolean;
  line: number;
}

/** A parameter: a name, or an object pattern `{ schema, raw: r }` (property -> local name). */
export type Param = string | { props: Array<[string, string]> };

/** What a chain of calls starts from. */
export type Root =
  /** A variable: a parameter, a loop variable, an alias (`const s = knex.schema`) resolved at parse. */
  | { local: string }
  /** `this` inside a `function` callback. */
  | { this: true }
  /** An identifier bound nowhere in the file, or imported from a package (a knex instance, say). */
  | { free: string }
  /** An identifier imported from a project file. */
  | { imp: string; name: string; path?: string[] };

/** One step of a chain: a method call, a property read (`.schema`), or a call of the root itself (`knex('t')`). */
export interface Call {
  /** The method or property name; `[]` for a computed one (`t[type](name)`), whose name is `key`. */
  m: string;
  key?: Val;
  /** Absent for a property read. */
  args?: Arg[];
  line: number;
}

/** An argument: a value, a callback, or a reference to a function by name. */
export type Arg = Val | { cb: FnIR } | { fnref: FnRef };

/**
 * A function to call: of this file, or imported. For a package's function, `callee` is the call's
 * source text: the function is followed when the package is a workspace package, else the call is
 * one whose code is not in the project.
 */
export type FnRef = { local: string } | { imp: string; name: string; path?: string[]; callee?: string };

/** A condition of an `if` or `?:`, decided at replay against the replayed schema where it can be. */
export type Cond =
  | { chain: Chain }
  | { not: Cond }
  | { and: [Cond, Cond] }
  | { or: [Cond, Cond] }
  | { lit: boolean }
  | { eq: [Val, Val]; neg?: boolean }
  /** `list.includes(item)` (an array, or a string and a substring). */
  | { includes: [Val, Val] }
  | { truthy: Val }
  | { unknown: string; line: number };

export interface Chain {
  root: Root;
  calls: Call[];
}

export type Stmt =
  /**
   * A chain of calls evaluated for its effect: `await knex.schema.createTable(...)`, `t.string('x')`.
   * `lazy`: the statement neither awaits nor returns it (a schema builder there never runs).
   */
  | { k: 'chain'; chain: Chain; line: number; lazy?: true }
  | { k: 'if'; cond: Cond; then: Stmt[]; else: Stmt[]; line: number }
  /** A loop over the elements of a value (`for...of`, `forEach`, `map` inside `Promise.all`, a counted `for` over a `range`). */
  | { k: 'each'; bind: Param[]; over: Val; body: Stmt[]; line: number; /** a callback (forEach, map): its `return` ends one round only */ fn?: true }
  /** The body of a callback run in place (`then`, an immediately invoked function): its `return` ends only the block. */
  | { k: 'block'; body: Stmt[]; line: number }
  /** A call of a function of this file or of another project file. */
  | { k: 'invoke'; fn: FnRef; args: Arg[]; line: number }
  /** `return` (after its value's effect): the rest of the function does not run. */
  | { k: 'return'; line: number }
  /** `break` (of a loop or a switch) and `continue` (of a loop). */
  | { k: 'break'; line: number }
  | { k: 'continue'; line: number }
  /** A switch: the clauses from the first whose test equals the value (or `default`) run until a break. */
  | { k: 'switch'; on: Val; cases: Array<{ test?: Val; body: Stmt[] }>; line: number }
  /** A call of a function the parse cannot see (from a package, or global): followed nowhere; a diagnostic when a builder is passed to it. */
  | { k: 'opaque'; callee: string; args: Arg[]; line: number }
  /** A `for`, `while` or `do` loop: never replayed; its body is kept so that the replay can tell whether skipping it may matter. */
  | { k: 'loop'; body: Stmt[]; line: number }
  /** Something the parse could not follow; becomes a diagnostic when replayed. */
  | { k: 'note'; code: string; message: string; line: number };

/** What a file exports: a value, or a function of this file (a key of `fns`). */
export type ExportEntry = { val: Val } | { fn: string };

/** A package.json's name and entry points (from its text alone). */
export interface PackageInfo {
  name: string;
  /** Entry points in the order they are tried: `source`, `exports` (require, node, default, import), `main`, `module`. */
  entries: string[];
}

export interface KnexFacts {
  /** The migration's `up` function (a key of `fns`), when the file has one. */
  up?: string;
  /** Whether a `down` function is exported (informational). */
  down?: boolean;
  /** The function an init (base-schema) file runs: `up`, else the default-exported function, else its only exported function. */
  main?: string;
  /** Top-level statements that use a builder (setup scripts). */
  top?: Stmt[];
  /** Functions of the file, by a file-unique key (their name; `name@line` for nested ones). */
  fns: Record<string, FnIR>;
  exports: Record<string, ExportEntry>;
  /** Modules whose exports this one passes on (`export * from './x'`, `module.exports = { ...require('./x') }`). */
  reexports?: string[];
  /** Relative import specifiers (`./x`, `../y.js`), in order of appearance. */
  imports: string[];
  /**
   * Bare specifiers the file loads when it runs (`@coop/names`, `lodash`), Node's own modules
   * aside, in order of appearance: those that name a workspace package are followed.
   */
  packages?: string[];
  /** Set for a package.json: what module resolution needs of it. */
  package?: PackageInfo;
  /** The default export when it looks like a Knex configuration (knexfiles). */
  config?: Val;
}
