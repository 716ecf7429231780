import { builtinModules, createRequire } from 'node:module';
import { detach, type Diagnostic, type FileFacts, type SourceFile } from '@schema-strata/core/extract';
import type { Arg, Call, Chain, Cond, ExportEntry, FnIR, FnRef, KnexFacts, PackageInfo, Param, Root, Stmt, Val } from './knex-facts.js';

type TsModule = typeof import('ts-morph').ts;
type Node = import('ts-morph').ts.Node;
type Expression = import('ts-morph').ts.Expression;
type Statement = import('ts-morph').ts.Statement;
type SourceFileNode = import('ts-morph').ts.SourceFile;
type FunctionLike =
  | import('ts-morph').ts.FunctionDeclaration
  | import('ts-morph').ts.FunctionExpression
  | import('ts-morph').ts.ArrowFunction
  | import('ts-morph').ts.MethodDeclaration;

let tsModule: TsModule | null = null;
/** The TypeScript compiler API bundled with ts-morph (loaded on first use). */
export function ts(): TsModule {
  if (!tsModule) {
    const require = createRequire(import.meta.url);
    tsModule = (require('ts-morph') as typeof import('ts-morph')).ts;
  }
  return tsModule;
}

/** What a name stands for while a file is compiled. */
type Binding =
  | { kind: 'val'; val: Val }
  | { kind: 'local' }
  | { kind: 'alias'; chain: Chain }
  | { kind: 'cond'; cond: Cond }
  | { kind: 'fn'; key: string }
  | { kind: 'imp'; imp: string; name: string; path?: string[] }
  | { kind: 'pkg'; module: string; name: string }
  | { kind: 'handle'; stmt: Extract<Stmt, { k: 'chain' }> };

class Scope {
  private readonly map = new Map<string, Binding>();
  constructor(readonly parent?: Scope) {}
  get(name: string): Binding | undefined {
    for (let s: Scope | undefined = this; s; s = s.parent) {
      const b = s.map.get(name);
      if (b) return b;
    }
    return undefined;
  }
  set(name: string, b: Binding): void {
    this.map.set(name, b);
  }
}

const PROMISE_ALL = new Set(['all', 'allSettled', 'race', 'any']);
const PROMISE_SERIES = new Set(['each', 'mapSeries', 'map', 'mapSync']);
const CONFIG_KEYS = new Set(['client', 'dialect', 'connection', 'migrations', 'useNullAsDefault', 'pool', 'searchPath']);

/**
 * Whether an `{ expr }` value's text is a name the file does not declare (the parse keeps such a
 * name as its text; `function` is its text of a method, not a name).
 */
export function isUndeclaredName(text: string): boolean {
  return /^(?!function$)[A-Za-z_$][\w$]*$/.test(text);
}

const NODE_MODULES = new Set(builtinModules);

/** One of Node's own modules (`fs`, `node:path`)? */
export function isNodeModule(spec: string): boolean {
  return spec.startsWith('node:') || NODE_MODULES.has(spec) || NODE_MODULES.has(spec.split('/')[0]!);
}

/** A bare specifier that could name a package of the project (not Node's own, not Knex). */
export function isProjectPackage(spec: string): boolean {
  return !isRelative(spec) && !spec.startsWith('/') && !isNodeModule(spec) && spec !== 'knex' && !spec.startsWith('knex/');
}

/** Is a relative module specifier (a file of the project)? */
export function isRelative(spec: string): boolean {
  return spec.startsWith('./') || spec.startsWith('../') || spec === '.' || spec === '..';
}

/** A value, if it is a literal of JSON (no placeholders left). */
export function isLiteral(v: Val): v is string | number | boolean | null {
  return v === null || typeof v !== 'object';
}

/** Is a value an object literal (`{ obj: [...] }`)? */
export function isObj(v: Val | undefined): v is { obj: Array<[string, Val]> } {
  return !!v && typeof v === 'object' && 'obj' in v;
}

export function isArr(v: Val | undefined): v is { arr: Val[] } {
  return !!v && typeof v === 'object' && 'arr' in v;
}

/** A member of an object value, or undefined. The last entry of a key wins, as in JavaScript. */
export function member(v: Val, key: string): Val | undefined {
  if (!isObj(v)) return undefined;
  for (let i = v.obj.length - 1; i >= 0; i--) if (v.obj[i]![0] === key) return v.obj[i]![1];
  return undefined;
}

class FileCompiler {
  readonly fns: Record<string, FnIR> = {};
  readonly imports: string[] = [];
  private readonly pending = new Map<string, { node: FunctionLike; scope: Scope }>();
  private readonly compiling = new Set<string>();
  readonly top = new Scope();
  private readonly t: TsModule;

  constructor(private readonly sf: SourceFileNode) {
    const t = (this.t = ts());
    if (EQUALITY.size === 0) {
      for (const k of [t.SyntaxKind.EqualsEqualsEqualsToken, t.SyntaxKind.EqualsEqualsToken, t.SyntaxKind.ExclamationEqualsEqualsToken, t.SyntaxKind.ExclamationEqualsToken]) EQUALITY.add(k);
    }
  }

  line(n: Node): number {
    return this.sf.getLineAndCharacterOfPosition(n.getStart(this.sf)).line + 1;
  }

  text(n: Node): string {
    const s = n.getText(this.sf);
    return s.length > 200 ? s.slice(0, 197) + '...' : s;
  }

  /** Whether the file names a package that could be one of the project's (see `KnexFacts.packages`). */
  packageImports = false;

  private addImport(spec: string): void {
    if (isRelative(spec)) {
      if (!this.imports.includes(spec)) this.imports.push(spec);
    } else if (isProjectPackage(spec)) this.packageImports = true;
  }

  // ---------------------------------------------------------------- functions

  /** Register a function for compiling on demand; returns its key. */
  registerFn(name: string, node: FunctionLike, scope: Scope, nested: boolean): string {
    let key = nested ? `${name}@${this.line(node)}` : name;
    while (this.pending.has(key) || this.fns[key]) key += "'";
    this.pending.set(key, { node, scope });
    return key;
  }

  /** Compile a registered function (once). */
  ensureFn(key: string): void {
    if (this.fns[key] || this.compiling.has(key)) return;
    const p = this.pending.get(key);
    if (!p) return;
    this.compiling.add(key);
    this.fns[key] = this.compileFn(p.node, p.scope);
    this.compiling.delete(key);
  }

  compileFn(node: FunctionLike, outer: Scope, paramBindings?: Array<Binding | undefined>): FnIR {
    const t = this.t;
    const scope = new Scope(outer);
    const params: Param[] = [];
    node.parameters.forEach((p, i) => {
      const pre = paramBindings?.[i];
      if (t.isIdentifier(p.name)) {
        params.push(p.name.text);
        scope.set(p.name.text, pre ?? { kind: 'local' });
      } else if (t.isObjectBindingPattern(p.name)) {
        const props: Array<[string, string]> = [];
        for (const el of p.name.elements) {
          if (!t.isIdentifier(el.name)) continue;
          const prop = el.propertyName && (t.isIdentifier(el.propertyName) || t.isStringLiteral(el.propertyName)) ? el.propertyName.text : el.name.text;
          props.push([prop, el.name.text]);
          scope.set(el.name.text, { kind: 'local' });
        }
        params.push({ props });
      } else {
        params.push(`_${i}`);
      }
    });
    const usesThis = t.isFunctionExpression(node) || t.isFunctionDeclaration(node) || t.isMethodDeclaration(node);
    const body: Stmt[] = [];
    if (node.body) {
      if (t.isBlock(node.body)) this.statements(node.body.statements, scope, body);
      else this.effect(node.body as Expression, scope, body);
    }
    if (body.length > 0 && body[body.length - 1]!.k === 'return') body.pop();
    return { params, body, ...(usesThis ? { usesThis: true } : {}), line: this.line(node) };
  }

  private isFunctionNode(e: Node): e is FunctionLike {
    const t = this.t;
    return t.isArrowFunction(e) || t.isFunctionExpression(e);
  }

  // ---------------------------------------------------------------- statements

  statements(list: readonly Statement[], scope: Scope, out: Stmt[]): void {
    const t = this.t;
    // hoist function declarations
    for (const st of list) {
      if (t.isFunctionDeclaration(st) && st.name && st.body) {
        scope.set(st.name.text, { kind: 'fn', key: this.registerFn(st.name.text, st, scope, scope !== this.top) });
      }
    }
    for (const st of list) this.statement(st, scope, out);
  }

  statement(st: Statement, scope: Scope, out: Stmt[]): void {
    const t = this.t;
    if (t.isExpressionStatement(st)) this.effect(st.expression, scope, out, this.awaited(st.expression));
    else if (t.isReturnStatement(st)) {
      if (st.expression) this.effect(st.expression, scope, out);
      out.push({ k: 'return', line: this.line(st) });
    } else if (t.isVariableStatement(st)) this.variables(st.declarationList, scope, out);
    else if (t.isIfStatement(st)) {
      const cond = this.cond(st.expression, scope);
      const th: Stmt[] = [];
      const el: Stmt[] = [];
      this.statement(st.thenStatement, new Scope(scope), th);
      if (st.elseStatement) this.statement(st.elseStatement, new Scope(scope), el);
      if ('lit' in cond) out.push(...(cond.lit ? th : el));
      else out.push({ k: 'if', cond, then: th, else: el, line: this.line(st) });
    } else if (t.isBlock(st)) this.statements(st.statements, new Scope(scope), out);
    else if (t.isTryStatement(st)) {
      this.statements(st.tryBlock.statements, new Scope(scope), out);
      if (st.finallyBlock) this.statements(st.finallyBlock.statements, new Scope(scope), out);
    } else if (t.isForOfStatement(st) || t.isForInStatement(st)) {
      const inner = new Scope(scope);
      const bind = this.loopBindings(st.initializer, inner);
      const over = this.val(st.expression, scope);
      const body: Stmt[] = [];
      this.statement(st.statement, inner, body);
      if (body.length > 0) out.push({ k: 'each', bind, over: t.isForInStatement(st) ? { keys: over } : over, body, line: this.line(st) });
    } else if (t.isSwitchStatement(st)) {
      const inner = new Scope(scope);
      const cases = st.caseBlock.clauses.map((c) => {
        const body: Stmt[] = [];
        this.statements(c.statements, inner, body);
        return t.isCaseClause(c) ? { test: this.val(c.expression, scope), body } : { body };
      });
      if (cases.some((c) => c.body.some((x) => x.k !== 'break'))) out.push({ k: 'switch', on: this.val(st.expression, scope), cases, line: this.line(st) });
    } else if (t.isBreakStatement(st) && !st.label) {
      out.push({ k: 'break', line: this.line(st) });
    } else if (t.isContinueStatement(st) && !st.label) {
      out.push({ k: 'continue', line: this.line(st) });
    } else if (t.isForStatement(st) && this.countedLoop(st, scope, out)) {
      // replayed over the range of its counter
    } else if (t.isForStatement(st) || t.isWhileStatement(st) || t.isDoStatement(st)) {
      const inner: Stmt[] = [];
      // such a loop is not followed; the replay says so when its body may change the schema
      this.statement(st.statement, new Scope(scope), inner);
      if (inner.some((x) => x.k !== 'break' && x.k !== 'continue')) out.push({ k: 'loop', body: inner, line: this.line(st) });
    } else if (t.isFunctionDeclaration(st) || t.isEmptyStatement(st) || t.isThrowStatement(st)) {
      // hoisted above / nothing to replay
    } else if (t.isLabeledStatement(st)) this.statement(st.statement, scope, out);
  }

  /**
   * A counted loop, `for (let i = A; i < B; i++)` (also `<=`, `B > i`, `++i`, `i += n`, `i = i + n`
   * with n a positive literal; the counter assigned nowhere in the body): a loop over the range of
   * its counter, whose bounds the replay resolves. Any other `for` is left to the caller.
   */
  private countedLoop(st: import('ts-morph').ts.ForStatement, scope: Scope, out: Stmt[]): boolean {
    const t = this.t;
    const K = t.SyntaxKind;
    const init = st.initializer;
    if (!init || !t.isVariableDeclarationList(init) || init.declarations.length !== 1) return false;
    const decl = init.declarations[0]!;
    if (!t.isIdentifier(decl.name) || !decl.initializer) return false;
    const name = decl.name.text;
    const isCounter = (e: Node): boolean => t.isIdentifier(e) && e.text === name;
    const c = st.condition ? this.unwrap(st.condition) : undefined;
    if (!c || !t.isBinaryExpression(c)) return false;
    const op = c.operatorToken.kind;
    let to: Expression;
    if (isCounter(c.left) && (op === K.LessThanToken || op === K.LessThanEqualsToken)) to = c.right;
    else if (isCounter(c.right) && (op === K.GreaterThanToken || op === K.GreaterThanEqualsToken)) to = c.left;
    else return false;
    const inclusive = op === K.LessThanEqualsToken || op === K.GreaterThanEqualsToken;
    const inc = st.incrementor ? this.unwrap(st.incrementor) : undefined;
    let step: number | undefined;
    if (inc && (t.isPostfixUnaryExpression(inc) || t.isPrefixUnaryExpression(inc)) && inc.operator === K.PlusPlusToken && isCounter(inc.operand)) step = 1;
    else if (inc && t.isBinaryExpression(inc) && isCounter(inc.left)) {
      const r = this.unwrap(inc.right);
      if (inc.operatorToken.kind === K.PlusEqualsToken && t.isNumericLiteral(r)) step = Number(r.text);
      else if (inc.operatorToken.kind === K.EqualsToken && t.isBinaryExpression(r) && r.operatorToken.kind === K.PlusToken && isCounter(r.left) && t.isNumericLiteral(r.right)) {
        step = Number(r.right.text);
      }
    }
    if (!step || !(step > 0)) return false;
    // a counter the body assigns is no plain range
    let assigned = false;
    const visit = (n: Node): void => {
      if (assigned) return;
      if ((t.isPostfixUnaryExpression(n) || t.isPrefixUnaryExpression(n)) && (n.operator === K.PlusPlusToken || n.operator === K.MinusMinusToken) && isCounter(n.operand)) assigned = true;
      else if (t.isBinaryExpression(n) && n.operatorToken.kind >= K.FirstAssignment && n.operatorToken.kind <= K.LastAssignment && isCounter(n.left)) assigned = true;
      else n.forEachChild(visit);
    };
    visit(st.statement);
    if (assigned) return false;
    const inner = new Scope(scope);
    inner.set(name, { kind: 'local' });
    const body: Stmt[] = [];
    this.statement(st.statement, inner, body);
    const range = { from: this.val(decl.initializer, scope), to: this.val(to, scope), step, ...(inclusive ? { inclusive: true as const } : {}) };
    if (body.length > 0) out.push({ k: 'each', bind: [name], over: { range }, body, line: this.line(st) });
    return true;
  }

  private loopBindings(init: import('ts-morph').ts.ForInitializer, scope: Scope): Param[] {
    const t = this.t;
    const decl = t.isVariableDeclarationList(init) ? init.declarations[0] : undefined;
    const name = decl ? decl.name : t.isIdentifier(init) ? init : undefined;
    if (!name) return ['_'];
    if (t.isIdentifier(name)) {
      scope.set(name.text, { kind: 'local' });
      return [name.text];
    }
    if (t.isArrayBindingPattern(name)) {
      const out: Param[] = [];
      name.elements.forEach((el, i) => {
        if (t.isBindingElement(el) && t.isIdentifier(el.name)) {
          scope.set(el.name.text, { kind: 'local' });
          out.push(el.name.text);
        } else out.push(`_${i}`);
      });
      return [{ props: out.map((n, i) => [String(i), String(n)]) }];
    }
    if (t.isObjectBindingPattern(name)) {
      const props: Array<[string, string]> = [];
      for (const el of name.elements) {
        if (!t.isIdentifier(el.name)) continue;
        const prop = el.propertyName && t.isIdentifier(el.propertyName) ? el.propertyName.text : el.name.text;
        props.push([prop, el.name.text]);
        scope.set(el.name.text, { kind: 'local' });
      }
      return [{ props }];
    }
    return ['_'];
  }

  variables(list: import('ts-morph').ts.VariableDeclarationList, scope: Scope, out: Stmt[]): void {
    const t = this.t;
    for (const d of list.declarations) {
      if (!d.initializer) {
        if (t.isIdentifier(d.name)) scope.set(d.name.text, { kind: 'local' });
        continue;
      }
      const init = this.unwrap(d.initializer);
      if (t.isIdentifier(d.name)) {
        const name = d.name.text;
        if (this.isFunctionNode(init)) {
          scope.set(name, { kind: 'fn', key: this.registerFn(name, init, scope, scope !== this.top) });
          continue;
        }
        const req = this.requireOf(init);
        if (req) {
          if (isRelative(req.spec)) scope.set(name, { kind: 'imp', imp: req.spec, name: '*', ...(req.path.length ? { path: req.path } : {}) });
          else scope.set(name, { kind: 'pkg', module: req.spec, name: req.path[0] ?? '*' });
          continue;
        }
        const b = this.bindingOf(init, scope, out);
        scope.set(name, b);
      } else if (t.isObjectBindingPattern(d.name)) {
        const req = this.requireOf(init);
        const base = !req && this.rootKind(init, scope) === 'builder' ? this.chainOf(init, scope) : null;
        for (const el of d.name.elements) {
          if (!t.isIdentifier(el.name)) continue;
          const prop = el.propertyName && (t.isIdentifier(el.propertyName) || t.isStringLiteral(el.propertyName)) ? el.propertyName.text : el.name.text;
          if (req) {
            if (isRelative(req.spec)) scope.set(el.name.text, { kind: 'imp', imp: req.spec, name: req.path[0] ?? prop, ...(req.path[0] ? { path: [...req.path.slice(1), prop] } : {}) });
            else scope.set(el.name.text, { kind: 'pkg', module: req.spec, name: prop });
          } else if (base) {
            scope.set(el.name.text, { kind: 'alias', chain: { root: base.root, calls: [...base.calls, { m: prop, line: this.line(el) }] } });
          } else {
            const v = this.val(init, scope);
            scope.set(el.name.text, { kind: 'val', val: this.memberOf(v, prop) });
          }
        }
      } else if (t.isArrayBindingPattern(d.name)) {
        for (const el of d.name.elements) if (t.isBindingElement(el) && t.isIdentifier(el.name)) scope.set(el.name.text, { kind: 'local' });
      }
    }
  }

  /** What `const x = <init>` binds x to; emits the initialiser's effect when it has one. */
  private bindingOf(init: Expression, scope: Scope, out: Stmt[]): Binding {
    const t = this.t;
    if (this.rootKind(init, scope) === 'builder') {
      const outer = this.outerMethod(init);
      if (outer === 'then' || outer === 'catch' || outer === 'finally') {
        this.effect(init, scope, out);
        return { kind: 'local' };
      }
      const chain = this.chainOf(init, scope);
      if (chain) {
        const last = chain.calls[chain.calls.length - 1];
        if (last && (last.m === 'hasTable' || last.m === 'hasColumn') && last.args) return { kind: 'cond', cond: { chain } };
        if (chain.calls.every((c) => !c.args || c.m === 'withSchema')) return { kind: 'alias', chain };
        const stmt: Extract<Stmt, { k: 'chain' }> = { k: 'chain', chain, line: this.line(init) };
        out.push(stmt);
        return { kind: 'handle', stmt };
      }
    }
    if (t.isCallExpression(init)) {
      const kind = this.rootKind(init, scope);
      const outer = this.outerMethod(init);
      const { root } = this.rootInfo(init);
      const promise = t.isIdentifier(root) && (root.text === 'Promise' || root.text === 'Bluebird');
      if (kind === 'fn' || kind === 'imp' || promise || outer === 'then' || this.isFunctionNode(this.unwrap(init.expression))) {
        // a call of a helper, Promise.all(...): run it for its effects
        this.effect(init, scope, out);
        return { kind: 'local' };
      }
    }
    return { kind: 'val', val: this.val(init, scope) };
  }

  /** The name of the outermost method called: `then` for `a.b().then(f)`. */
  private outerMethod(e0: Expression): string | undefined {
    const t = this.t;
    const e = this.unwrap(e0);
    if (!t.isCallExpression(e)) return undefined;
    const callee = this.unwrap(e.expression);
    return t.isPropertyAccessExpression(callee) ? callee.name.text : undefined;
  }

  /** `require('x')`, `require('x').a.b`: the specifier and member path. */
  private requireOf(e: Expression): { spec: string; path: string[] } | null {
    const t = this.t;
    const path: string[] = [];
    let cur: Expression = e;
    while (t.isPropertyAccessExpression(cur)) {
      path.unshift(cur.name.text);
      cur = cur.expression;
    }
    if (t.isCallExpression(cur) && t.isIdentifier(cur.expression) && cur.expression.text === 'require' && cur.arguments.length === 1) {
      const a = cur.arguments[0]!;
      if (t.isStringLiteral(a) || t.isNoSubstitutionTemplateLiteral(a)) {
        this.addImport(a.text);
        return { spec: a.text, path };
      }
    }
    return null;
  }

  unwrap(e: Expression): Expression {
    const t = this.t;
    for (;;) {
      if (t.isParenthesizedExpression(e) || t.isAsExpression(e) || t.isNonNullExpression(e) || t.isSatisfiesExpression(e) || t.isTypeAssertionExpression(e)) e = e.expression;
      else if (t.isAwaitExpression(e) || t.isVoidExpression(e)) e = e.expression;
      else return e;
    }
  }

  // ---------------------------------------------------------------- chains

  /** The name or `this` a chain starts from, and the first member read or called on it, without compiling anything. */
  private rootInfo(e0: Expression): { root: Node; first?: string; direct: boolean } {
    const t = this.t;
    let cur: Node = this.unwrap(e0);
    let first: string | undefined;
    let direct = false;
    for (;;) {
      if (t.isCallExpression(cur)) {
        const callee = this.unwrap(cur.expression);
        if (t.isIdentifier(callee)) direct = true;
        cur = callee;
      } else if (t.isPropertyAccessExpression(cur)) {
        first = cur.name.text;
        direct = false;
        cur = this.unwrap(cur.expression);
      } else if (t.isElementAccessExpression(cur)) {
        first = t.isStringLiteral(cur.argumentExpression) ? cur.argumentExpression.text : undefined;
        direct = false;
        cur = this.unwrap(cur.expression);
      } else return { root: cur, first, direct };
    }
  }

  /** What a chain's root name is bound to. */
  private rootKind(e: Expression, scope: Scope): 'builder' | 'fn' | 'imp' | 'value' | 'other' {
    const t = this.t;
    const { root, first } = this.rootInfo(e);
    if (root.kind === t.SyntaxKind.ThisKeyword) return 'builder';
    if (!t.isIdentifier(root)) return 'other';
    const b = scope.get(root.text);
    const knexish = first === 'schema' || first === 'raw' || first === 'transaction';
    if (!b) return knexish ? 'builder' : 'other';
    switch (b.kind) {
      case 'local':
      case 'alias':
      case 'handle':
        return 'builder';
      case 'fn':
        return 'fn';
      case 'imp':
        return knexish ? 'builder' : 'imp';
      case 'pkg':
        return knexish ? 'builder' : 'other';
      case 'val':
        return isUnknown(b.val) && knexish ? 'builder' : 'value';
      default:
        return 'value';
    }
  }

  /** Flatten `a.b(c).d` into a root and calls, or null when it does not start from a name or `this`. */
  chainOf(e0: Expression, scope: Scope): Chain | null {
    const t = this.t;
    const calls: Call[] = [];
    let e = this.unwrap(e0);
    for (;;) {
      if (t.isCallExpression(e)) {
        const callee = this.unwrap(e.expression);
        if (t.isPropertyAccessExpression(callee)) {
          calls.unshift({ m: callee.name.text, args: e.arguments.map((a) => this.arg(a, scope)), line: this.line(callee.name) });
          e = this.unwrap(callee.expression);
        } else if (t.isElementAccessExpression(callee)) {
          const k = this.val(callee.argumentExpression, scope);
          const args = e.arguments.map((a) => this.arg(a, scope));
          calls.unshift(typeof k === 'string' ? { m: k, args, line: this.line(callee) } : { m: '[]', key: k, args, line: this.line(callee) });
          e = this.unwrap(callee.expression);
        } else if (t.isIdentifier(callee)) {
          calls.unshift({ m: '()', args: e.arguments.map((a) => this.arg(a, scope)), line: this.line(e) });
          e = callee;
        } else return null;
      } else if (t.isPropertyAccessExpression(e)) {
        calls.unshift({ m: e.name.text, line: this.line(e.name) });
        e = this.unwrap(e.expression);
      } else if (t.isElementAccessExpression(e) && t.isStringLiteral(e.argumentExpression)) {
        calls.unshift({ m: e.argumentExpression.text, line: this.line(e) });
        e = this.unwrap(e.expression);
      } else break;
    }
    if (e.kind === t.SyntaxKind.ThisKeyword) return { root: { this: true }, calls };
    if (!t.isIdentifier(e)) return null;
    const name = e.text;
    const b = scope.get(name);
    if (!b) return { root: { free: name }, calls };
    switch (b.kind) {
      case 'local':
        return { root: { local: name }, calls };
      case 'alias':
        return { root: b.chain.root, calls: [...b.chain.calls, ...calls] };
      case 'handle':
        return { root: b.stmt.chain.root, calls: [...b.stmt.chain.calls, ...calls] };
      case 'imp':
        return { root: { imp: b.imp, name: b.name, ...(b.path ? { path: b.path } : {}) }, calls };
      default:
        return { root: { free: name }, calls };
    }
  }

  private arg(a: Expression, scope: Scope): Arg {
    const t = this.t;
    const e = this.unwrap(a);
    if (this.isFunctionNode(e)) return { cb: this.compileFn(e, scope) };
    if (t.isIdentifier(e)) {
      const b = scope.get(e.text);
      if (b?.kind === 'fn') {
        this.ensureFn(b.key);
        return { fnref: { local: b.key } };
      }
    }
    return this.val(a, scope);
  }

  // ---------------------------------------------------------------- effects

  /** Is an expression statement awaited (or yielded), so that a Knex builder in it runs? */
  private awaited(e0: Expression): boolean {
    const t = this.t;
    let e = e0;
    while (t.isParenthesizedExpression(e) || t.isAsExpression(e) || t.isNonNullExpression(e) || t.isSatisfiesExpression(e)) e = e.expression;
    return t.isAwaitExpression(e) || t.isYieldExpression(e);
  }

  /**
   * Compile an expression evaluated for its effect. `consumed` is false for a statement that
   * neither awaits nor returns its value: a Knex schema builder there never runs (it runs when
   * awaited or `then`-ed); the replay reports it and leaves it out.
   */
  effect(e0: Expression, scope: Scope, out: Stmt[], consumed = true): void {
    const t = this.t;
    const e = this.unwrap(e0);
    const line = this.line(e);
    if (t.isBinaryExpression(e)) {
      const op = e.operatorToken.kind;
      if (op === t.SyntaxKind.AmpersandAmpersandToken || op === t.SyntaxKind.BarBarToken) {
        const c = this.cond(e.left, scope);
        const body: Stmt[] = [];
        this.effect(e.right, scope, body, consumed);
        if (body.length === 0) return;
        const cond: Cond = op === t.SyntaxKind.BarBarToken ? { not: c } : c;
        out.push({ k: 'if', cond, then: body, else: [], line });
        return;
      }
      if (op === t.SyntaxKind.CommaToken) {
        this.effect(e.left, scope, out, false);
        this.effect(e.right, scope, out, consumed);
      }
      return;
    }
    if (t.isConditionalExpression(e)) {
      const th: Stmt[] = [];
      const el: Stmt[] = [];
      this.effect(e.whenTrue, scope, th, consumed);
      this.effect(e.whenFalse, scope, el, consumed);
      if (th.length || el.length) out.push({ k: 'if', cond: this.cond(e.condition, scope), then: th, else: el, line });
      return;
    }
    if (t.isArrayLiteralExpression(e)) {
      for (const x of e.elements) this.effect(x, scope, out);
      return;
    }
    if (!t.isCallExpression(e)) return;
    const callee = this.unwrap(e.expression);

    // an immediately invoked function
    if (this.isFunctionNode(callee)) {
      const fn = this.compileFn(callee, scope);
      if (fn.body.length > 0) out.push({ k: 'block', body: fn.body, line });
      return;
    }

    if (t.isPropertyAccessExpression(callee)) {
      const method = callee.name.text;
      const recv = this.unwrap(callee.expression);
      // Promise.all([...]) / Promise.all(xs.map(cb)) / Bluebird.each(xs, cb)
      // (older Knex passed a Promise library as up's second parameter: `function (knex, Promise)`)
      if (t.isIdentifier(recv) && (recv.text === 'Promise' || recv.text === 'Bluebird' || recv.text === 'BPromise' || recv.text === 'P')) {
        if (PROMISE_ALL.has(method) && e.arguments[0]) {
          this.effect(e.arguments[0], scope, out);
          return;
        }
        if (PROMISE_SERIES.has(method) && e.arguments.length >= 2) {
          this.loopOver(e.arguments[0]!, e.arguments[1]!, scope, out, line);
          return;
        }
      }
      // .then(cb) on anything: its receiver first, then the callback's statements
      if ((method === 'then' || method === 'finally') && e.arguments.length > 0) {
        const result = this.resultOf(recv, scope, out);
        const cb = this.unwrap(e.arguments[0]!);
        if (this.isFunctionNode(cb)) {
          const fn = this.compileFn(cb, scope, [result]);
          if (fn.body.length > 0) out.push({ k: 'block', body: fn.body, line });
        } else if (t.isIdentifier(cb)) {
          const b = scope.get(cb.text);
          if (b?.kind === 'fn') {
            this.ensureFn(b.key);
            out.push({ k: 'invoke', fn: { local: b.key }, args: [], line });
          }
        }
        return;
      }
      if (method === 'catch') {
        this.effect(recv, scope, out);
        return;
      }
      // xs.forEach(cb) / xs.map(cb) over a value (not a builder)
      if ((method === 'forEach' || method === 'map' || method === 'flatMap') && e.arguments[0] && this.rootKind(recv, scope) !== 'builder') {
        this.loopOver(recv, e.arguments[0], scope, out, line);
        return;
      }
    }

    const kind = this.rootKind(e, scope);
    const info = this.rootInfo(e);
    const rootName = t.isIdentifier(info.root) ? info.root.text : undefined;
    if (kind === 'fn' && info.direct && rootName && t.isIdentifier(callee)) {
      // a helper function of this file
      const b = scope.get(rootName) as Extract<Binding, { kind: 'fn' }>;
      this.ensureFn(b.key);
      out.push({ k: 'invoke', fn: { local: b.key }, args: e.arguments.map((a) => this.arg(a, scope)), line });
      return;
    }
    if (kind === 'imp' && rootName) {
      // a helper function of another project file: f(...), ns.f(...), obj.f(...)
      const b = scope.get(rootName) as Extract<Binding, { kind: 'imp' }>;
      const fn = this.importedFn(b.imp, b.name, b.path ?? [], callee);
      if (fn) out.push({ k: 'invoke', fn, args: e.arguments.map((a) => this.arg(a, scope)), line });
      return;
    }
    if (kind === 'builder') {
      const chain = this.chainOf(e, scope);
      if (!chain) return;
      const b = rootName ? scope.get(rootName) : undefined;
      if (b?.kind === 'handle') {
        // col.notNullable() on `const col = t.integer('x')`: continue that statement's chain
        b.stmt.chain.calls = chain.calls;
        return;
      }
      out.push({ k: 'chain', chain, line, ...(consumed ? {} : { lazy: true as const }) });
      return;
    }
    if (kind === 'other' && rootName && e.arguments.length > 0) {
      // a function the parse cannot see; a diagnostic at replay if a builder is handed to it
      const args = e.arguments.map((a) => this.arg(a, scope));
      if (args.some((a) => typeof a === 'object' && a !== null && ('local' in a || 'cb' in a))) {
        const b = scope.get(rootName);
        const fn = b?.kind === 'pkg' && !isNodeModule(b.module) ? this.importedFn(b.module, b.name, [], callee) : null;
        // a package's function: followed at replay when the package is one of the repository's
        if (fn) out.push({ k: 'invoke', fn: { ...fn, callee: this.text(callee) }, args, line });
        else out.push({ k: 'opaque', callee: this.text(callee), args, line });
      }
    }
  }

  /**
   * The function a call of an imported binding names (`f(...)`, `ns.f(...)`, `obj.f(...)`):
   * `spec` and `name` as imported, `path` the members the binding already stands for; null for a
   * callee that is not a chain of members on a name.
   */
  private importedFn(spec: string, name: string, path: readonly string[], callee: Expression): { imp: string; name: string; path?: string[] } | null {
    const t = this.t;
    const names: string[] = [];
    let cur: Expression = this.unwrap(callee);
    while (t.isPropertyAccessExpression(cur)) {
      names.unshift(cur.name.text);
      cur = this.unwrap(cur.expression);
    }
    if (!t.isIdentifier(cur)) return null;
    const all = [...path, ...names];
    return name === '*' && all.length > 0
      ? { imp: spec, name: all[0]!, ...(all.length > 1 ? { path: all.slice(1) } : {}) }
      : { imp: spec, name, ...(all.length ? { path: all } : {}) };
  }

  /** Emit the effect of a promise-producing expression; what its resolved value stands for. */
  private resultOf(e0: Expression, scope: Scope, out: Stmt[]): Binding | undefined {
    const e = this.unwrap(e0);
    const m = this.outerMethod(e);
    if ((m === 'hasTable' || m === 'hasColumn') && this.rootKind(e, scope) === 'builder') {
      const chain = this.chainOf(e, scope);
      if (chain) return { kind: 'cond', cond: { chain } };
    }
    this.effect(e, scope, out);
    return undefined;
  }

  private loopOver(list: Expression, cb0: Expression, scope: Scope, out: Stmt[], line: number): void {
    const t = this.t;
    const over = this.val(list, scope);
    const cb = this.unwrap(cb0);
    if (this.isFunctionNode(cb)) {
      const fn = this.compileFn(cb, scope);
      if (fn.body.length > 0) out.push({ k: 'each', bind: fn.params.slice(0, 1), over, body: fn.body, line, fn: true });
    } else if (t.isIdentifier(cb)) {
      const b = scope.get(cb.text);
      if (b?.kind === 'fn') {
        this.ensureFn(b.key);
        out.push({ k: 'each', bind: ['$item'], over, body: [{ k: 'invoke', fn: { local: b.key }, args: [{ local: '$item' }], line }], line, fn: true });
      }
    }
  }

  // ---------------------------------------------------------------- conditions

  cond(e0: Expression, scope: Scope): Cond {
    const t = this.t;
    const e = this.unwrap(e0);
    if (t.isPrefixUnaryExpression(e) && e.operator === t.SyntaxKind.ExclamationToken) {
      const c = this.cond(e.operand, scope);
      return 'lit' in c ? { lit: !c.lit } : { not: c };
    }
    if (t.isBinaryExpression(e)) {
      const op = e.operatorToken.kind;
      if (op === t.SyntaxKind.AmpersandAmpersandToken) return { and: [this.cond(e.left, scope), this.cond(e.right, scope)] };
      if (op === t.SyntaxKind.BarBarToken) return { or: [this.cond(e.left, scope), this.cond(e.right, scope)] };
      const eq = op === t.SyntaxKind.EqualsEqualsEqualsToken || op === t.SyntaxKind.EqualsEqualsToken;
      const ne = op === t.SyntaxKind.ExclamationEqualsEqualsToken || op === t.SyntaxKind.ExclamationEqualsToken;
      if (eq || ne) {
        const a = this.val(e.left, scope);
        const b = this.val(e.right, scope);
        if (isLiteral(a) && isLiteral(b)) return { lit: (a === b) === eq };
        return { eq: [a, b], ...(ne ? { neg: true } : {}) };
      }
    }
    if (e.kind === t.SyntaxKind.TrueKeyword) return { lit: true };
    if (e.kind === t.SyntaxKind.FalseKeyword) return { lit: false };
    if (t.isIdentifier(e)) {
      const b = scope.get(e.text);
      if (b?.kind === 'cond') return b.cond;
      if (b?.kind === 'val' && isBoolWhen(b.val)) return b.val.when;
      if (b?.kind === 'val') return isLiteral(b.val) ? { lit: !!b.val } : { truthy: b.val };
      if (b?.kind === 'local') return { truthy: { local: e.text } };
    }
    if (t.isCallExpression(e)) {
      const m = this.outerMethod(e);
      if ((m === 'hasTable' || m === 'hasColumn') && this.rootKind(e, scope) === 'builder') {
        const chain = this.chainOf(e, scope);
        if (chain) return { chain };
      }
      const inc = this.includesCond(e, scope);
      if (inc) return inc;
    }
    const v = this.val(e, scope);
    if (isLiteral(v)) return { lit: !!v };
    if (isBoolWhen(v)) return v.when;
    if (typeof v === 'object' && v !== null && !('expr' in v)) return { truthy: v };
    return { unknown: this.text(e), line: this.line(e) };
  }

  /** `list.includes(item)`: decided here when both are literals, else at replay; null for another call. */
  private includesCond(e: import('ts-morph').ts.CallExpression, scope: Scope): Cond | null {
    const t = this.t;
    const callee = this.unwrap(e.expression);
    if (!t.isPropertyAccessExpression(callee) || callee.name.text !== 'includes' || e.arguments.length !== 1) return null;
    const list = this.val(callee.expression, scope);
    const item = this.val(e.arguments[0]!, scope);
    if (typeof list === 'string' && typeof item === 'string') return { lit: list.includes(item) };
    if (isArr(list) && list.arr.every(isLiteral) && isLiteral(item)) return { lit: (list.arr as Val[]).includes(item) };
    if (isObj(list) || (isLiteral(list) && typeof list !== 'string')) return null;
    return { includes: [list, item] };
  }

  /** Is an expression a condition by its form (a comparison, a negation, `includes`, `&&` / `||` of such), so that its value is a boolean? */
  private isBoolish(e0: Expression, scope: Scope): boolean {
    const t = this.t;
    const e = this.unwrap(e0);
    if (e.kind === t.SyntaxKind.TrueKeyword || e.kind === t.SyntaxKind.FalseKeyword) return true;
    if (t.isPrefixUnaryExpression(e)) return e.operator === t.SyntaxKind.ExclamationToken;
    if (t.isBinaryExpression(e)) {
      const op = e.operatorToken.kind;
      if (op === t.SyntaxKind.AmpersandAmpersandToken || op === t.SyntaxKind.BarBarToken) return this.isBoolish(e.left, scope) && this.isBoolish(e.right, scope);
      return EQUALITY.has(op);
    }
    if (t.isCallExpression(e)) return this.outerMethod(e) === 'includes' && e.arguments.length === 1;
    if (t.isIdentifier(e)) {
      const b = scope.get(e.text);
      return b?.kind === 'cond' || (b?.kind === 'val' && (typeof b.val === 'boolean' || isBoolWhen(b.val)));
    }
    return false;
  }

  // ---------------------------------------------------------------- values

  memberOf(v: Val, key: string): Val {
    if (isObj(v)) {
      const m = member(v, key);
      if (m !== undefined) return m;
      return v.obj.some(([k]) => k === '...') ? { at: v, key } : { undef: true };
    }
    if (isArr(v) && key === 'length') return v.arr.length;
    if (typeof v === 'object' && v !== null) {
      if ('imp' in v) return { ...v, path: [...(v.path ?? []), key] };
      if ('local' in v) return { ...v, path: [...(v.path ?? []), key] };
    }
    if (typeof v === 'string' && key === 'length') return v.length;
    return { at: v, key };
  }

  val(e0: Expression, scope: Scope): Val {
    const t = this.t;
    const e = this.unwrap(e0);
    if (t.isStringLiteral(e) || t.isNoSubstitutionTemplateLiteral(e)) return e.text;
    if (t.isNumericLiteral(e)) return Number(e.text);
    if (t.isPrefixUnaryExpression(e) && e.operator === t.SyntaxKind.MinusToken && t.isNumericLiteral(e.operand)) return -Number(e.operand.text);
    if (t.isPrefixUnaryExpression(e) && e.operator === t.SyntaxKind.ExclamationToken) return boolVal(this.cond(e, scope));
    if (e.kind === t.SyntaxKind.TrueKeyword) return true;
    if (e.kind === t.SyntaxKind.FalseKeyword) return false;
    if (e.kind === t.SyntaxKind.NullKeyword) return null;
    if (t.isTemplateExpression(e)) {
      const parts: Val[] = [e.head.text];
      for (const s of e.templateSpans) parts.push(this.val(s.expression, scope), s.literal.text);
      return concat(parts);
    }
    if (t.isArrayLiteralExpression(e)) {
      const arr: Val[] = [];
      for (const x of e.elements) {
        if (t.isSpreadElement(x)) {
          const v = this.val(x.expression, scope);
          if (isArr(v)) arr.push(...v.arr);
          else return { expr: this.text(e) };
        } else arr.push(this.val(x, scope));
      }
      return { arr };
    }
    if (t.isObjectLiteralExpression(e)) {
      const obj: Array<[string, Val]> = [];
      for (const p of e.properties) {
        if (t.isPropertyAssignment(p)) {
          const k = this.propName(p.name, scope);
          if (k !== null) obj.push([k, this.val(p.initializer, scope)]);
        } else if (t.isShorthandPropertyAssignment(p)) {
          obj.push([p.name.text, this.identifierVal(p.name.text, scope)]);
        } else if (t.isSpreadAssignment(p)) {
          const v = this.val(p.expression, scope);
          if (isObj(v)) obj.push(...v.obj);
          else obj.push(['...', v]);
        } else if (t.isMethodDeclaration(p)) {
          const k = this.propName(p.name, scope);
          if (k !== null) obj.push([k, { expr: 'function' }]);
        }
      }
      return { obj };
    }
    if (t.isIdentifier(e)) return this.identifierVal(e.text, scope);
    if (e.kind === t.SyntaxKind.ThisKeyword) return { local: 'this' };
    if (t.isPropertyAccessExpression(e)) {
      const base = this.unwrap(e.expression);
      if (t.isPropertyAccessExpression(base) && t.isIdentifier(base.expression) && base.expression.text === 'process' && base.name.text === 'env') {
        return { env: e.name.text };
      }
      if (t.isMetaProperty(base) && (e.name.text === 'dirname')) return { dir: true };
      return this.memberOf(this.val(base, scope), e.name.text);
    }
    if (t.isElementAccessExpression(e)) {
      const key = this.val(e.argumentExpression, scope);
      const base = this.val(e.expression, scope);
      if (typeof key === 'string') return this.memberOf(base, key);
      if (typeof key === 'number' && isArr(base)) return base.arr[key] ?? { undef: true };
      return { at: base, key };
    }
    if (t.isBinaryExpression(e)) {
      const op = e.operatorToken.kind;
      if (op === t.SyntaxKind.PlusToken) {
        const a = this.val(e.left, scope);
        const b = this.val(e.right, scope);
        if (typeof a === 'number' && typeof b === 'number') return a + b;
        return concat([a, b]);
      }
      if (EQUALITY.has(op)) return boolVal(this.cond(e, scope));
      // `a === 'x' || a === 'y'`: a boolean, as a condition
      if ((op === t.SyntaxKind.BarBarToken || op === t.SyntaxKind.AmpersandAmpersandToken) && this.isBoolish(e, scope)) return boolVal(this.cond(e, scope));
      if (op === t.SyntaxKind.BarBarToken || op === t.SyntaxKind.QuestionQuestionToken) {
        const a = this.val(e.left, scope);
        const b = this.val(e.right, scope);
        if (isLiteral(a)) return (op === t.SyntaxKind.BarBarToken ? !!a : a !== null) ? a : b;
        if (isObj(a) || isArr(a)) return a;
        return { or: [a, b] };
      }
      return { expr: this.text(e) };
    }
    if (t.isConditionalExpression(e)) {
      const c = this.cond(e.condition, scope);
      if ('lit' in c) return this.val(c.lit ? e.whenTrue : e.whenFalse, scope);
      return { when: c, then: this.val(e.whenTrue, scope), else: this.val(e.whenFalse, scope) };
    }
    if (t.isCallExpression(e)) return this.callVal(e, scope);
    if (e.kind === t.SyntaxKind.UndefinedKeyword) return { undef: true };
    return { expr: this.text(e) };
  }

  private identifierVal(name: string, scope: Scope): Val {
    const b = scope.get(name);
    if (!b) {
      if (name === '__dirname') return { dir: true };
      if (name === 'undefined') return { undef: true };
      return { expr: name };
    }
    switch (b.kind) {
      case 'val':
        return b.val;
      case 'local':
        return { local: name };
      case 'imp':
        return { imp: b.imp, name: b.name, ...(b.path ? { path: b.path } : {}) };
      case 'alias':
        return this.aliasVal(b.chain, name);
      case 'pkg':
        // Node's process module imported (`const { env } = require('process')`): read as the
        // global is, so that its settings have the paths --knex-assume names (`process.env.X`)
        if (b.module === 'process' || b.module === 'node:process') return b.name === '*' || b.name === 'default' ? { expr: 'process' } : { at: { expr: 'process' }, key: b.name };
        // Node's own modules are never the project's; another package may be (a workspace package)
        if (isNodeModule(b.module)) return { expr: name };
        return { imp: b.module, name: b.name, as: name };
      default:
        return { expr: name };
    }
  }

  /** An alias as a value (`const db = knex`, then `db.client.dialect`): its root and the members it reads. */
  private aliasVal(chain: Chain, name: string): Val {
    const r = chain.root;
    if (chain.calls.some((c) => c.args)) return { expr: name };
    let v: Val = 'local' in r ? { local: r.local } : 'this' in r ? { local: 'this' } : 'imp' in r ? { imp: r.imp, name: r.name, ...(r.path ? { path: r.path } : {}) } : { expr: r.free };
    for (const c of chain.calls) v = this.memberOf(v, c.m);
    return v;
  }

  /**
   * An enum as an object of its members' values, as TypeScript compiles it: a string or number
   * initializer, else the previous member's number plus one (from 0), a numeric member also
   * mapped back from its value to its name; a member given another expression is read as a value,
   * and the members after it without an initializer are not known.
   */
  private enumVal(st: import('ts-morph').ts.EnumDeclaration, scope: Scope): Val {
    const t = this.t;
    const obj: Array<[string, Val]> = [];
    let next: number | null = 0;
    for (const m of st.members) {
      const name = t.isIdentifier(m.name) || t.isStringLiteral(m.name) ? m.name.text : null;
      if (name === null) {
        next = null;
        continue;
      }
      let v: Val;
      if (m.initializer) v = this.val(m.initializer, scope);
      else v = next === null ? { expr: `${st.name.text}.${name}` } : next;
      next = typeof v === 'number' ? v + 1 : null;
      obj.push([name, v]);
      // a numeric member also maps its value back to its name (`E[E["Top"] = 0] = "Top"`)
      if (typeof v === 'number') obj.push([String(v), name]);
    }
    return { obj };
  }

  private propName(n: import('ts-morph').ts.PropertyName, scope: Scope): string | null {
    const t = this.t;
    if (t.isIdentifier(n) || t.isStringLiteral(n) || t.isNumericLiteral(n) || t.isPrivateIdentifier(n)) return n.text;
    if (t.isComputedPropertyName(n)) {
      const v = this.val(n.expression, scope);
      return typeof v === 'string' || typeof v === 'number' ? String(v) : null;
    }
    return null;
  }

  private callVal(e: import('ts-morph').ts.CallExpression, scope: Scope): Val {
    const t = this.t;
    const callee = this.unwrap(e.expression);
    const args = () => e.arguments.map((a) => this.val(a, scope));
    const req = this.requireOf(e);
    if (req) return isRelative(req.spec) ? { imp: req.spec, name: '*' } : { expr: this.text(e) };
    if (t.isIdentifier(callee)) {
      const b = scope.get(callee.text);
      const fromPath = b?.kind === 'pkg' && (b.module === 'path' || b.module === 'node:path');
      if ((fromPath && (b.name === 'join' || b.name === 'resolve')) || (!b && (callee.text === 'join' || callee.text === 'resolve'))) return { join: args() };
      if (fromPath && b.name === 'dirname') return this.dirnameOf(e);
      if (callee.text === 'String' && e.arguments[0]) return this.val(e.arguments[0], scope);
      return { expr: this.text(e) };
    }
    if (t.isPropertyAccessExpression(callee)) {
      const m = callee.name.text;
      const inc = m === 'includes' ? this.includesCond(e, scope) : null;
      if (inc) return boolVal(inc);
      const recv = this.unwrap(callee.expression);
      if (t.isIdentifier(recv)) {
        const b = scope.get(recv.text);
        const isPath = (b?.kind === 'pkg' && (b.module === 'path' || b.module === 'node:path')) || (!b && recv.text === 'path');
        if (isPath && (m === 'join' || m === 'resolve')) return { join: args() };
        if (isPath && m === 'dirname') return this.dirnameOf(e);
        if (recv.text === 'Object' && !b && (m === 'keys' || m === 'values' || m === 'entries') && e.arguments[0]) {
          const v = this.val(e.arguments[0], scope);
          return m === 'keys' ? { keys: v } : m === 'values' ? { values: v } : { entries: v };
        }
      }
      if (t.isPropertyAccessExpression(recv) && (recv.name.text === 'posix') && (m === 'join' || m === 'resolve')) return { join: args() };
      if (m === 'raw') return { raw: e.arguments[0] ? this.val(e.arguments[0], scope) : '' };
      if (t.isPropertyAccessExpression(recv) && recv.name.text === 'fn') return { fn: m, args: args() };
      const base = this.val(recv, scope);
      if (typeof base === 'string') {
        if (m === 'toLowerCase') return base.toLowerCase();
        if (m === 'toUpperCase') return base.toUpperCase();
        if (m === 'trim') return base.trim();
        if (m === 'toString') return base;
      }
      if (m === 'toString' && typeof base === 'number') return String(base);
      if ((m === 'concat') && isArr(base)) {
        const rest = args();
        if (rest.every(isArr)) return { arr: [...base.arr, ...rest.flatMap((r) => (r as { arr: Val[] }).arr)] };
      }
      if (m === 'join' && isArr(base) && base.arr.every((x) => typeof x === 'string')) {
        const sep = e.arguments[0] ? this.val(e.arguments[0], scope) : ',';
        if (typeof sep === 'string') return base.arr.join(sep);
      }
    }
    return { expr: this.text(e) };
  }

  /** `path.dirname(fileURLToPath(import.meta.url))` and `path.dirname(__filename)`: the file's directory. */
  private dirnameOf(e: import('ts-morph').ts.CallExpression): Val {
    const a = e.arguments[0] ? this.text(e.arguments[0]) : '';
    if (/import\.meta\.url|__filename/.test(a)) return { dir: true };
    return { expr: this.text(e) };
  }

  // ---------------------------------------------------------------- the file

  compileFile(): KnexFacts {
    const t = this.t;
    const sf = this.sf;
    const exports: Record<string, ExportEntry> = {};
    const scope = this.top;
    const topStmts: Stmt[] = [];
    let defaultVal: Val | undefined;

    // imports first: they are hoisted
    for (const st of sf.statements) {
      if (!t.isImportDeclaration(st) || !t.isStringLiteral(st.moduleSpecifier)) continue;
      const spec = st.moduleSpecifier.text;
      this.addImport(spec);
      const clause = st.importClause;
      if (!clause) continue;
      const bind = (local: string, name: string): void => {
        scope.set(local, isRelative(spec) ? { kind: 'imp', imp: spec, name } : { kind: 'pkg', module: spec, name });
      };
      if (clause.name) bind(clause.name.text, 'default');
      const nb = clause.namedBindings;
      if (nb && t.isNamespaceImport(nb)) bind(nb.name.text, '*');
      if (nb && t.isNamedImports(nb)) for (const el of nb.elements) bind(el.name.text, (el.propertyName ?? el.name).text);
    }

    const reexports: string[] = [];
    const reexport = (spec: string): void => {
      if (isRelative(spec) && !reexports.includes(spec)) reexports.push(spec);
    };
    const exportFn = (name: string, key: string): void => {
      exports[name] = { fn: key };
    };
    const exportValue = (name: string, init: Expression): void => {
      const e = this.unwrap(init);
      if (this.isFunctionNode(e)) {
        exportFn(name, this.registerFn(name, e, scope, false));
        return;
      }
      if (t.isIdentifier(e)) {
        const b = scope.get(e.text);
        if (b?.kind === 'fn') return exportFn(name, b.key);
      }
      exports[name] = { val: this.val(e, scope) };
    };
    /**
     * `module.exports = {...}` (and TypeScript's `export = {...}`): each member is also a named
     * export, as Node's CommonJS interop sees it. `export default {...}` is only the default
     * export: Knex reads `up` from the module itself, so such a migration has no up().
     */
    const exportObject = (e0: Expression, commonjs: boolean): void => {
      const e = this.unwrap(e0);
      if (t.isObjectLiteralExpression(e) && !commonjs) {
        defaultVal = this.val(e, scope);
        exports['default'] = { val: defaultVal };
        return;
      }
      if (t.isObjectLiteralExpression(e)) {
        for (const p of e.properties) {
          if (t.isPropertyAssignment(p)) {
            const k = this.propName(p.name, scope);
            if (k !== null) exportValue(k, p.initializer);
          } else if (t.isShorthandPropertyAssignment(p)) {
            const b = scope.get(p.name.text);
            if (b?.kind === 'fn') exportFn(p.name.text, b.key);
            else exports[p.name.text] = { val: this.identifierVal(p.name.text, scope) };
          } else if (t.isMethodDeclaration(p) && p.body) {
            const k = this.propName(p.name, scope);
            if (k !== null) exportFn(k, this.registerFn(k, p, scope, false));
          } else if (t.isSpreadAssignment(p)) {
            // module.exports = { ...require('./a'), ...b }: a's (or b's module's) exports pass on
            const inner = this.unwrap(p.expression);
            const req = this.requireOf(inner);
            if (req && req.path.length === 0) reexport(req.spec);
            else if (t.isIdentifier(inner)) {
              const b = scope.get(inner.text);
              if (b?.kind === 'imp' && b.name === '*' && !b.path) reexport(b.imp);
            }
          }
        }
        defaultVal = this.val(e, scope);
        exports['default'] = { val: defaultVal };
        return;
      }
      if (t.isIdentifier(e)) {
        const b = scope.get(e.text);
        if (b?.kind === 'fn') return exportFn('default', b.key);
        if (b?.kind === 'val') {
          if (commonjs && isObj(b.val)) for (const [k, v] of b.val.obj) if (k !== '...') exports[k] = { val: v };
          defaultVal = b.val;
          exports['default'] = { val: defaultVal };
          return;
        }
        if (b?.kind === 'imp') {
          exports['default'] = { val: { imp: b.imp, name: b.name, ...(b.path ? { path: b.path } : {}) } };
          return;
        }
      }
      if (this.isFunctionNode(e)) return exportFn('default', this.registerFn('default', e, scope, false));
      defaultVal = this.val(e, scope);
      exports['default'] = { val: defaultVal };
    };

    for (const st of sf.statements) {
      if (t.isFunctionDeclaration(st) && st.name && st.body) {
        scope.set(st.name.text, { kind: 'fn', key: this.registerFn(st.name.text, st, scope, false) });
      }
      // an enum's members are constants (`enum FieldNameTool { label = 'label' }`), read anywhere in the file
      if (t.isEnumDeclaration(st) && !(t.getModifiers(st) ?? []).some((m) => m.kind === t.SyntaxKind.DeclareKeyword)) {
        scope.set(st.name.text, { kind: 'val', val: this.enumVal(st, scope) });
      }
    }
    for (const st of sf.statements) {
      const isExported = (t.canHaveModifiers(st) ? t.getModifiers(st) ?? [] : []).some((m) => m.kind === t.SyntaxKind.ExportKeyword);
      const isDefault = (t.canHaveModifiers(st) ? t.getModifiers(st) ?? [] : []).some((m) => m.kind === t.SyntaxKind.DefaultKeyword);
      if (t.isImportDeclaration(st)) continue;
      if (t.isEnumDeclaration(st)) {
        const b = scope.get(st.name.text);
        if (isExported && b?.kind === 'val') exports[st.name.text] = { val: b.val };
        continue;
      }
      if (t.isFunctionDeclaration(st)) {
        if (st.name && st.body && isExported) {
          const b = scope.get(st.name.text);
          if (b?.kind === 'fn') exportFn(isDefault ? 'default' : st.name.text, b.key);
        } else if (!st.name && st.body && isDefault) {
          exportFn('default', this.registerFn('default', st, scope, false));
        }
        continue;
      }
      if (t.isVariableStatement(st)) {
        this.variables(st.declarationList, scope, topStmts);
        if (isExported) {
          for (const d of st.declarationList.declarations) {
            if (!t.isIdentifier(d.name)) continue;
            const b = scope.get(d.name.text);
            if (b?.kind === 'fn') exportFn(d.name.text, b.key);
            else if (b?.kind === 'val') exports[d.name.text] = { val: b.val };
            else if (b?.kind === 'imp') exports[d.name.text] = { val: { imp: b.imp, name: b.name, ...(b.path ? { path: b.path } : {}) } };
          }
        }
        continue;
      }
      if (t.isExportAssignment(st)) {
        exportObject(st.expression, !!st.isExportEquals);
        continue;
      }
      if (t.isExportDeclaration(st)) {
        const from = st.moduleSpecifier && t.isStringLiteral(st.moduleSpecifier) ? st.moduleSpecifier.text : undefined;
        if (from) this.addImport(from);
        if (from && !st.exportClause) reexport(from);
        if (st.exportClause && t.isNamedExports(st.exportClause)) {
          for (const el of st.exportClause.elements) {
            const local = (el.propertyName ?? el.name).text;
            const name = el.name.text;
            if (from) {
              if (isRelative(from)) exports[name] = { val: { imp: from, name: local } };
              continue;
            }
            const b = scope.get(local);
            if (b?.kind === 'fn') exportFn(name, b.key);
            else if (b?.kind === 'val') exports[name] = { val: b.val };
            else if (b?.kind === 'imp') exports[name] = { val: { imp: b.imp, name: b.name, ...(b.path ? { path: b.path } : {}) } };
          }
        }
        continue;
      }
      if (t.isExpressionStatement(st)) {
        const ex = this.unwrap(st.expression);
        if (t.isBinaryExpression(ex) && ex.operatorToken.kind === t.SyntaxKind.EqualsToken) {
          const target = this.exportTarget(ex.left);
          if (target === 'module') {
            exportObject(ex.right, true);
            continue;
          }
          if (target) {
            exportValue(target, ex.right);
            continue;
          }
        }
      }
      this.statement(st, scope, topStmts);
    }

    // compile what can run: up, the default export, the other exported functions (helpers); never down
    for (const [name, entry] of Object.entries(exports)) {
      if ('fn' in entry && name !== 'down') this.ensureFn(entry.fn);
    }
    // an import whose bindings serve only as types is elided by TypeScript: it is not followed
    const modules = this.imports.length > 0 || this.packageImports ? runtimeModules(this.sf) : null;
    const runtime = modules ? new Set(modules) : null;
    const imports = runtime ? this.imports.filter((spec) => runtime.has(spec)) : this.imports;
    const facts: KnexFacts = { fns: this.fns, exports, imports };
    const packages = modules ? modules.filter(isProjectPackage) : [];
    if (packages.length > 0) facts.packages = packages;
    const up = exports['up'];
    if (up && 'fn' in up) facts.up = up.fn;
    if (exports['down']) facts.down = true;
    const fnExports = Object.entries(exports).filter(([n, x]) => 'fn' in x && n !== 'down');
    const main = facts.up ?? (exports['default'] && 'fn' in exports['default'] ? exports['default'].fn : undefined) ?? (fnExports.length === 1 ? (fnExports[0]![1] as { fn: string }).fn : undefined);
    if (main) facts.main = main;
    if (topStmts.length > 0) facts.top = topStmts;
    if (defaultVal !== undefined && looksLikeConfig(defaultVal)) facts.config = defaultVal;
    if (reexports.length > 0) facts.reexports = reexports;
    return facts;
  }

  /** `module.exports` -> 'module'; `exports.x` / `module.exports.x` -> 'x'; else null. */
  private exportTarget(e0: Expression): string | null {
    const t = this.t;
    const e = this.unwrap(e0);
    const text = (n: Expression): string | null => {
      if (t.isIdentifier(n)) return n.text;
      if (t.isPropertyAccessExpression(n)) {
        const b = text(n.expression);
        return b === null ? null : `${b}.${n.name.text}`;
      }
      return null;
    };
    const s = text(e);
    if (s === 'module.exports') return 'module';
    if (s && /^(module\.)?exports\.[A-Za-z_$][\w$]*$/.test(s)) return s.slice(s.lastIndexOf('.') + 1);
    if (t.isElementAccessExpression(e) && t.isStringLiteral(e.argumentExpression)) {
      const b = text(e.expression);
      if (b === 'exports' || b === 'module.exports') return e.argumentExpression.text;
    }
    return null;
  }
}

/** The equality operators' syntax kinds (filled when the first file is compiled: TypeScript is loaded on first use). */
const EQUALITY = new Set<number>();

/** A boolean value of a condition: the literal, or the condition decided at replay. */
function boolVal(c: Cond): Val {
  return 'lit' in c ? c.lit : { when: c, then: true, else: false };
}

/** Is a value a condition's boolean (`const isPg = knex.client.driverName === 'pg'`)? */
function isBoolWhen(v: Val): v is { when: Cond; then: true; else: false } {
  return typeof v === 'object' && v !== null && 'when' in v && v.then === true && v.else === false;
}

/** A value not known statically: an expression, a package's value, or a member of one (`R.knex` with `R` from a package). */
export function isUnknown(v: Val): boolean {
  if (typeof v !== 'object' || v === null) return false;
  // (a package's value is known only at replay, and then only for a workspace package)
  return 'expr' in v || ('imp' in v && v.as !== undefined) || ('at' in v && typeof v.key === 'string' && isUnknown(v.at));
}

/** Concatenate values, folding adjacent literals. */
export function concat(parts: Val[]): Val {
  const out: Val[] = [];
  for (const p of parts) {
    if (typeof p === 'object' && p !== null && 'cat' in p) out.push(...p.cat);
    else out.push(p);
  }
  const folded: Val[] = [];
  for (const p of out) {
    const last = folded[folded.length - 1];
    if (isLiteral(p) && p !== null && last !== undefined && isLiteral(last) && last !== null) folded[folded.length - 1] = String(last) + String(p);
    else folded.push(p);
  }
  if (folded.length === 1 && isLiteral(folded[0]!)) return String(folded[0]);
  return { cat: folded };
}

/** Does a default export look like a Knex configuration (flat, or per environment)? */
export function looksLikeConfig(v: Val): boolean {
  if (!isObj(v)) return false;
  if (v.obj.some(([k]) => CONFIG_KEYS.has(k))) return true;
  return v.obj.some(([, x]) => isObj(x) && x.obj.some(([k]) => CONFIG_KEYS.has(k)));
}

/** Options of the parse: none yet; the facts depend on the text only. */
export interface ParseResult {
  ok: boolean;
  facts?: KnexFacts;
  diagnostics: Diagnostic[];
}

/**
 * Parse one file's text (JavaScript or TypeScript, CommonJS or ESM; always with the TypeScript
 * parser, so that the result depends on the text only) into its facts.
 */
export function parseKnexSource(text: string): FileFacts<KnexFacts> {
  const t = ts();
  const sf = t.createSourceFile('file.ts', text, t.ScriptTarget.Latest, false, t.ScriptKind.TS);
  const parseDiagnostics = (sf as unknown as { parseDiagnostics?: Array<{ start?: number; messageText: unknown; category: number }> }).parseDiagnostics ?? [];
  const errors = parseDiagnostics.filter((d) => d.category === t.DiagnosticCategory.Error);
  if (errors.length > 0) {
    const first = errors[0]!;
    const pos = sf.getLineAndCharacterOfPosition(first.start ?? 0);
    const msg = t.flattenDiagnosticMessageText(first.messageText as string, ' ');
    return {
      ok: false,
      diagnostics: [{
        severity: 'error', code: 'knex/syntax-error', line: pos.line + 1, column: pos.character + 1,
        message: `syntax error: ${msg}${errors.length > 1 ? ` (and ${errors.length - 1} more)` : ''}`,
      }],
    };
  }
  try {
    // (facts are kept for the run: a copy, not slices of the text, see core's `detach`)
    const facts = detach(new FileCompiler(sf).compileFile());
    return { ok: true, facts };
  } catch (e) {
    return { ok: false, diagnostics: [{ severity: 'error', code: 'knex/parse-failed', message: `could not read the file: ${(e as Error).message}` }] };
  }
}

/**
 * The modules a file loads when it runs, in order of appearance: relative specifiers and those of
 * `isProjectPackage`, from imports, re-exports, `require()` and `import()` calls, but not what
 * TypeScript elides (`import type`, and imports whose bindings serve only as types), nor what is
 * only in comments.
 */
export function runtimeModules(sf: SourceFileNode): string[] {
  const t = ts();
  const out: string[] = [];
  const wanted = (spec: string): boolean => isRelative(spec) || isProjectPackage(spec);
  const add = (spec: string): void => {
    if (wanted(spec) && !out.includes(spec)) out.push(spec);
  };
  // imports that bind names: kept when one of the names is used outside a type
  const pending: Array<{ spec: string; names: string[]; at: number }> = [];
  const used = new Set<string>();
  const visit = (n: Node, inType: boolean): void => {
    if (t.isImportDeclaration(n)) {
      if (!t.isStringLiteral(n.moduleSpecifier) || !wanted(n.moduleSpecifier.text)) return;
      const c = n.importClause;
      if (!c) add(n.moduleSpecifier.text);
      else if (!c.isTypeOnly) {
        const names: string[] = c.name ? [c.name.text] : [];
        const b = c.namedBindings;
        if (b && t.isNamespaceImport(b)) names.push(b.name.text);
        else if (b) for (const el of b.elements) if (!el.isTypeOnly) names.push(el.name.text);
        if (names.length > 0) {
          pending.push({ spec: n.moduleSpecifier.text, names, at: out.length });
          out.push('');
        }
      }
      return;
    }
    if (t.isExportDeclaration(n)) {
      if (n.moduleSpecifier && t.isStringLiteral(n.moduleSpecifier) && !n.isTypeOnly) add(n.moduleSpecifier.text);
      if (!n.moduleSpecifier && n.exportClause) n.forEachChild((c) => visit(c, inType));
      return;
    }
    if (t.isCallExpression(n) && n.arguments.length === 1 && t.isStringLiteralLike(n.arguments[0]!)) {
      const callee = n.expression;
      if ((t.isIdentifier(callee) && callee.text === 'require') || callee.kind === t.SyntaxKind.ImportKeyword) add((n.arguments[0] as import('ts-morph').ts.StringLiteral).text);
    }
    if (t.isExternalModuleReference(n) && t.isStringLiteralLike(n.expression)) add(n.expression.text);
    let typeHere = inType;
    // (an interface's own clauses are inside its declaration, a type already)
    if (t.isHeritageClause(n)) typeHere = inType || n.token === t.SyntaxKind.ImplementsKeyword;
    else if (t.isInterfaceDeclaration(n) || t.isTypeAliasDeclaration(n) || (t.isTypeNode(n) && !t.isExpressionWithTypeArguments(n))) typeHere = true;
    if (!typeHere && t.isIdentifier(n)) used.add(n.text);
    n.forEachChild((c) => visit(c, typeHere));
  };
  sf.forEachChild((c) => visit(c, false));
  for (const p of pending) out[p.at] = p.names.some((x) => used.has(x)) && !out.includes(p.spec) ? p.spec : '';
  return out.filter((s) => s !== '');
}

/** The relative modules a source text loads when it runs (see `runtimeModules`). */
export function runtimeImportsOf(text: string): string[] {
  return runtimeModulesOf(text).filter(isRelative);
}

/** The modules a source text loads when it runs (see `runtimeModules`). */
export function runtimeModulesOf(text: string): string[] {
  const t = ts();
  // (memoised by blob: copies, not slices that keep the text alive)
  return detach(runtimeModules(t.createSourceFile('file.ts', text, t.ScriptTarget.Latest, false, t.ScriptKind.TS)));
}

/** `parseFile` of the adapter: the facts of one file, by its text. */
export function parseKnexFile(file: SourceFile): FileFacts<KnexFacts> {
  if (file.path === 'package.json' || file.path.endsWith('/package.json')) {
    const info = packageInfo(file.text);
    return { ok: true, facts: { fns: {}, exports: {}, imports: [], ...(info ? { package: info } : {}) } };
  }
  return parseKnexSource(file.text);
}

/**
 * What module resolution needs of a package.json's text: its name and entry points (`source`,
 * the `exports` of `.` under require, node, default, import, then `main`, `module`); null when
 * it is not JSON or has no name.
 */
export function packageInfo(text: string): PackageInfo | null {
  let pkg: unknown;
  try {
    pkg = JSON.parse(text);
  } catch {
    return null;
  }
  if (!pkg || typeof pkg !== 'object' || Array.isArray(pkg)) return null;
  const o = pkg as Record<string, unknown>;
  if (typeof o.name !== 'string' || o.name === '') return null;
  const entries: string[] = [];
  const add = (v: unknown): void => {
    if (typeof v === 'string' && v !== '' && !entries.includes(v)) entries.push(v);
  };
  add(o.source);
  const conditions = (v: unknown, depth: number): void => {
    if (typeof v === 'string') return add(v);
    if (depth > 4 || !v || typeof v !== 'object' || Array.isArray(v)) return;
    const c = v as Record<string, unknown>;
    for (const k of ['require', 'node', 'default', 'import']) if (k in c) conditions(c[k], depth + 1);
  };
  const exp = o.exports;
  if (exp && typeof exp === 'object' && !Array.isArray(exp) && '.' in exp) conditions((exp as Record<string, unknown>)['.'], 0);
  else if (!(exp && typeof exp === 'object' && Object.keys(exp).some((k) => k.startsWith('.')))) conditions(exp, 0);
  add(o.main);
  add(o.module);
  return { name: o.name, entries };
}

export type { Arg, Call, Chain, Cond, FnIR, FnRef, KnexFacts, PackageInfo, Root, Stmt, Val };
