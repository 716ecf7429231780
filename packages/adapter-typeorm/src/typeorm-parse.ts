import { createRequire } from 'node:module';
import { detach, type Diagnostic, type FileFacts, type SourceFile } from '@schema-strata/core/extract';
import type { ts as TsNamespace } from 'ts-morph';
import { parsePackageJson, type PackageFact } from './typeorm-modules.js';
import { DATA_SOURCE_TYPES } from './typeorm-types.js';

/**
 * Per-file facts: what one file says, read from its syntax tree (TypeScript's parser, as ts-morph
 * ships it), never run. Facts depend on the file's text alone and are plain JSON: names stay as
 * written (import specifiers, dotted references), and everything that needs another file
 * (a base class, an imported enum, a custom decorator) is resolved later, in the assembly.
 */

type Ts = typeof TsNamespace;
let tsModule: Ts | null = null;
/** TypeScript's compiler API as ts-morph bundles it (loaded on first use). */
export function typescript(): Ts {
  if (!tsModule) tsModule = (createRequire(import.meta.url)('ts-morph') as typeof import('ts-morph')).ts;
  return tsModule;
}

// ---------------------------------------------------------------------------------------------
// Values: expressions of decorator arguments, constants and options, kept as data

/** An expression as data. Resolution of references happens in the assembly. */
export type Value =
  /** A literal. */
  | { k: 'l'; v: string | number | boolean | null }
  /** `undefined`. */
  | { k: 'u' }
  /** An object literal: entries in order; a null key is a spread. */
  /** `cast`: the literal is under a type assertion (`{ ... } as never`), so its keys were not checked against the declared type. */
  | { k: 'o'; p: Array<[string | null, Value]>; cast?: true }
  /** An array literal (spread elements are `{k:'s'}`). */
  | { k: 'a'; e: Value[] }
  | { k: 's'; v: Value }
  /** A function value: its returned expression, when it has one, and its text. */
  | { k: 'f'; r?: Value; t: string }
  /** A reference by (dotted) name: `User`, `Role.Admin`, `orm.Column`. */
  | { k: 'r'; n: string }
  /** A parameter of an enclosing function: `d` function values out, index `i`, then the property path `a`. */
  | { k: 'p'; d: number; i: number; a?: string[] }
  /** A member of a value that is not a plain reference (a call's result, say). */
  | { k: 'm'; o: Value; n: string }
  | { k: 'c'; c: Value; a: Value[] }
  | { k: 'n'; c: Value; a: Value[] }
  /** A binary or logical expression (`??`, `||`, `&&`, `+`). */
  | { k: 'b'; o: string; l: Value; r: Value; /** (comparisons) the source text, for messages when not known */ t?: string }
  /** A conditional expression. */
  | { k: 'q'; c: Value; t: Value; f: Value }
  /** A template literal: text and values. */
  | { k: 't'; q: Array<string | Value> }
  /** Anything else, kept as source text. */
  | { k: 'x'; t: string };

/** A type as TypeScript's decorator metadata would serialise it, before references are resolved. */
export type DesignType =
  /** A constructor TypeScript names directly: String, Number, Boolean, Object, Array, Function, BigInt, Symbol. */
  | { k: 'c'; n: string }
  /** `void 0` (undefined, void, never, null). */
  | { k: 'v' }
  /** A type reference the checker resolves (`o`: inside a conditional type). */
  | { k: 'r'; n: string; o?: 1 }
  /** Constituents of a union (or intersection, `i`), serialised by the strictNullChecks rule in the assembly. */
  | { k: 'u'; m: DesignMember[]; i?: 1 };

export type DesignMember = DesignType | { k: 'null' } | { k: 'undef' } | { k: 'never' } | { k: 'unknown' } | { k: 'any' };

export interface DecoratorUse {
  /** The callee as written: `Column`, `orm.Column`. */
  n: string;
  /** Whether it was called (`@Column()`), not just named (`@Column`). */
  call: boolean;
  args: Value[];
  line: number;
}

export interface PropertyFact {
  name: string;
  line: number;
  decorators: DecoratorUse[];
  design: DesignType;
  /** Type as written, for messages. */
  typeText?: string;
  optional?: boolean;
}

export interface ClassFact {
  name: string;
  line: number;
  exported: boolean;
  isDefault: boolean;
  abstract?: boolean;
  /** The `extends` expression. */
  base?: Value;
  decorators: DecoratorUse[];
  props: PropertyFact[];
  /** Method names (for naming strategy classes). */
  methods?: string[];
  /** Static properties with an initializer (`static joinTable = 'tool_tags'`), read as values. */
  statics?: Array<[string, Value]>;
  /** The class body mentions snake case (for naming strategy classes). */
  snake?: boolean;
}

export interface FunctionFact {
  name: string;
  line: number;
  exported: boolean;
  isDefault: boolean;
  /** Every call in the function's body, as values relative to its parameters (a custom decorator's candidates). */
  calls: Value[];
  /** Expression returned, when the body is one expression or returns one. */
  returns?: Value;
  /** The body has more than one `return` of a value (under `if`, `switch`...): which one runs is decided at run time. */
  branched?: true;
  /** Default values of parameters, by index (null: none). */
  defaults?: Array<Value | null>;
}

export interface EnumFact {
  name: string;
  line: number;
  exported: boolean;
  /** Members and their values; null for a computed member. */
  members: Array<[string, string | number | null]>;
}

export interface ConstFact {
  name: string;
  line: number;
  exported: boolean;
  value: Value;
}

export interface AliasFact {
  name: string;
  exported: boolean;
  design: DesignType;
}

export interface SchemaFact {
  /** Variable holding the schema, when there is one. */
  name?: string;
  line: number;
  exported: boolean;
  isDefault: boolean;
  options: Value;
}

export interface ConfigFact {
  line: number;
  options: Value;
  /** `ormconfig.*`, `.env` or an options object found in source code. */
  source: 'ormconfig' | 'env' | 'code';
  /** Options that spread shared ones and add a database type: read for the type and naming, not for the entities. */
  settingsOnly?: true;
}

export interface ImportFact {
  from: string;
  /** Named imports: [local, imported]. */
  names: Array<[string, string]>;
  /** Local name of a default import. */
  def?: string;
  /** Local name of a namespace import (or of a whole `require`). */
  ns?: string;
  typeOnly?: boolean;
}

export interface ExportFact {
  /** Module re-exported from, when any. */
  from?: string;
  /** [exported, local or imported] pairs; absent for `export *`. */
  names?: Array<[string, string]>;
  /** `export * as ns from`. */
  ns?: string;
}

export interface TsconfigFact {
  extends?: string[];
  strict?: boolean;
  strictNullChecks?: boolean;
  baseUrl?: string;
  paths?: Record<string, string[]>;
  outDir?: string;
  rootDir?: string;
}

/** The facts of one file. */
export interface TypeormFileFacts {
  kind: 'source' | 'tsconfig' | 'config' | 'package';
  imports: ImportFact[];
  exports: ExportFact[];
  /** `export default <expression>` that is not a declaration. */
  defaultExport?: Value;
  classes: ClassFact[];
  functions: FunctionFact[];
  enums: EnumFact[];
  consts: ConstFact[];
  aliases: AliasFact[];
  schemas: SchemaFact[];
  configs: ConfigFact[];
  tsconfig?: TsconfigFact;
  /** Of a workspace package's package.json (kind `package`): what module resolution reads of it. */
  package?: PackageFact;
}

function emptyFacts(kind: TypeormFileFacts['kind']): TypeormFileFacts {
  return { kind, imports: [], exports: [], classes: [], functions: [], enums: [], consts: [], aliases: [], schemas: [], configs: [] };
}

// ---------------------------------------------------------------------------------------------
// Expression to value

interface Scope {
  /** `fact`: the function whose calls are collected; `value`: a function value; `dead`: a function whose parameters are unknown. */
  kind: 'fact' | 'value' | 'dead';
  params: Map<string, { i: number; a?: string[] }>;
  locals: Map<string, Value>;
  parent?: Scope;
}

const TEXT_LIMIT = 240;

class Reader {
  readonly ts: Ts;
  constructor(readonly sf: TsNamespace.SourceFile) {
    this.ts = typescript();
  }

  line(node: TsNamespace.Node): number {
    return this.sf.getLineAndCharacterOfPosition(node.getStart(this.sf)).line + 1;
  }

  text(node: TsNamespace.Node): string {
    const t = node.getText(this.sf);
    return t.length > TEXT_LIMIT ? t.slice(0, TEXT_LIMIT) + '...' : t;
  }

  propName(name: TsNamespace.PropertyName): string | null {
    const ts = this.ts;
    if (ts.isIdentifier(name) || ts.isStringLiteral(name) || ts.isNumericLiteral(name) || ts.isNoSubstitutionTemplateLiteral(name)) return name.text;
    if (ts.isPrivateIdentifier(name)) return null;
    if (ts.isComputedPropertyName(name)) {
      const e = name.expression;
      if (ts.isStringLiteral(e) || ts.isNumericLiteral(e)) return e.text;
    }
    return null;
  }

  /** A dotted name for identifiers and property accesses (`a.b.c`), else null. */
  dotted(e: TsNamespace.Expression): string | null {
    const ts = this.ts;
    if (ts.isIdentifier(e)) return e.text;
    if (ts.isPropertyAccessExpression(e) && ts.isIdentifier(e.name)) {
      const left = this.dotted(e.expression);
      return left === null ? null : `${left}.${e.name.text}`;
    }
    return null;
  }

  private lookup(name: string, scope: Scope | undefined): Value | null {
    let d = 0;
    for (let s = scope; s; s = s.parent) {
      const p = s.params.get(name);
      if (p) {
        if (s.kind === 'dead') return { k: 'x', t: name };
        return { k: 'p', d, i: p.i, ...(p.a ? { a: p.a } : {}) };
      }
      const l = s.locals.get(name);
      if (l) return d === 0 ? l : { k: 'x', t: name };
      if (s.kind === 'value') d++;
    }
    return null;
  }

  value(e: TsNamespace.Expression, scope?: Scope): Value {
    const ts = this.ts;
    let cast = false;
    while (ts.isParenthesizedExpression(e) || ts.isAsExpression(e) || ts.isSatisfiesExpression(e) || ts.isNonNullExpression(e) || ts.isTypeAssertionExpression(e)) {
      if (ts.isAsExpression(e) || ts.isTypeAssertionExpression(e)) cast = true;
      e = e.expression;
    }
    if (ts.isStringLiteral(e) || ts.isNoSubstitutionTemplateLiteral(e)) return { k: 'l', v: e.text };
    if (ts.isNumericLiteral(e)) return { k: 'l', v: Number(e.text) };
    if (ts.isPrefixUnaryExpression(e) && e.operator === ts.SyntaxKind.MinusToken && ts.isNumericLiteral(e.operand)) return { k: 'l', v: -Number(e.operand.text) };
    if (e.kind === ts.SyntaxKind.TrueKeyword) return { k: 'l', v: true };
    if (e.kind === ts.SyntaxKind.FalseKeyword) return { k: 'l', v: false };
    if (e.kind === ts.SyntaxKind.NullKeyword) return { k: 'l', v: null };
    if (ts.isIdentifier(e)) {
      if (e.text === 'undefined') return { k: 'u' };
      return this.lookup(e.text, scope) ?? { k: 'r', n: e.text };
    }
    if (ts.isObjectLiteralExpression(e)) {
      const p: Array<[string | null, Value]> = [];
      for (const prop of e.properties) {
        if (ts.isPropertyAssignment(prop)) {
          const n = this.propName(prop.name);
          if (n !== null) p.push([n, this.value(prop.initializer, scope)]);
        } else if (ts.isShorthandPropertyAssignment(prop)) {
          p.push([prop.name.text, this.lookup(prop.name.text, scope) ?? { k: 'r', n: prop.name.text }]);
        } else if (ts.isSpreadAssignment(prop)) {
          p.push([null, this.value(prop.expression, scope)]);
        } else if (ts.isMethodDeclaration(prop) && prop.name) {
          const n = this.propName(prop.name);
          if (n !== null) p.push([n, this.functionValue(prop, scope)]);
        }
      }
      return cast ? { k: 'o', p, cast } : { k: 'o', p };
    }
    if (ts.isArrayLiteralExpression(e)) {
      return { k: 'a', e: e.elements.map((x) => (ts.isSpreadElement(x) ? { k: 's' as const, v: this.value(x.expression, scope) } : this.value(x, scope))) };
    }
    if (ts.isArrowFunction(e) || ts.isFunctionExpression(e)) return this.functionValue(e, scope);
    if (ts.isPropertyAccessExpression(e) || (ts.isElementAccessExpression(e) && (ts.isStringLiteral(e.argumentExpression) || ts.isNumericLiteral(e.argumentExpression)))) {
      const name = ts.isPropertyAccessExpression(e) ? e.name.text : (e.argumentExpression as TsNamespace.StringLiteral).text;
      const inner = this.value(e.expression, scope);
      if (inner.k === 'r') return { k: 'r', n: `${inner.n}.${name}` };
      if (inner.k === 'p') return { ...inner, a: [...(inner.a ?? []), name] };
      return { k: 'm', o: inner, n: name };
    }
    if (ts.isCallExpression(e)) return { k: 'c', c: this.value(e.expression, scope), a: e.arguments.map((a) => this.arg(a, scope)) };
    if (ts.isNewExpression(e)) return { k: 'n', c: this.value(e.expression, scope), a: (e.arguments ?? []).map((a) => this.arg(a, scope)) };
    if (ts.isBinaryExpression(e)) {
      const op = e.operatorToken.kind;
      const o =
        op === ts.SyntaxKind.QuestionQuestionToken ? '??' : op === ts.SyntaxKind.BarBarToken ? '||' : op === ts.SyntaxKind.AmpersandAmpersandToken ? '&&' : op === ts.SyntaxKind.PlusToken ? '+' : null;
      if (o) return { k: 'b', o, l: this.value(e.left, scope), r: this.value(e.right, scope) };
      const cmp =
        op === ts.SyntaxKind.EqualsEqualsEqualsToken ? '===' : op === ts.SyntaxKind.ExclamationEqualsEqualsToken ? '!==' : op === ts.SyntaxKind.EqualsEqualsToken ? '==' : op === ts.SyntaxKind.ExclamationEqualsToken ? '!=' : null;
      if (cmp) return { k: 'b', o: cmp, l: this.value(e.left, scope), r: this.value(e.right, scope), t: this.text(e) };
    }
    if (ts.isConditionalExpression(e)) return { k: 'q', c: this.value(e.condition, scope), t: this.value(e.whenTrue, scope), f: this.value(e.whenFalse, scope) };
    if (ts.isTemplateExpression(e)) {
      const q: Array<string | Value> = [e.head.text];
      for (const span of e.templateSpans) q.push(this.value(span.expression, scope), span.literal.text);
      return { k: 't', q };
    }
    return { k: 'x', t: this.text(e) };
  }

  private arg(a: TsNamespace.Expression, scope?: Scope): Value {
    return this.ts.isSpreadElement(a) ? { k: 's', v: this.value(a.expression, scope) } : this.value(a, scope);
  }

  private paramsOf(fn: TsNamespace.SignatureDeclarationBase): Map<string, { i: number; a?: string[] }> {
    const ts = this.ts;
    const params = new Map<string, { i: number; a?: string[] }>();
    fn.parameters.forEach((p, i) => {
      if (ts.isIdentifier(p.name)) params.set(p.name.text, { i });
      else if (ts.isObjectBindingPattern(p.name)) {
        for (const el of p.name.elements) {
          if (!ts.isIdentifier(el.name)) continue;
          const key = el.propertyName && (ts.isIdentifier(el.propertyName) || ts.isStringLiteral(el.propertyName)) ? el.propertyName.text : el.name.text;
          params.set(el.name.text, { i, a: [key] });
        }
      }
    });
    return params;
  }

  /** The expression a function returns: its expression body, or its first top-level `return`. */
  returned(fn: TsNamespace.FunctionLikeDeclarationBase): TsNamespace.Expression | undefined {
    const ts = this.ts;
    const body = fn.body;
    if (!body) return undefined;
    if (!ts.isBlock(body)) return body as TsNamespace.Expression;
    for (const st of body.statements) if (ts.isReturnStatement(st) && st.expression) return st.expression;
    return undefined;
  }

  /** How many `return <value>` statements the function's own body holds (inner functions aside). */
  private valueReturns(fn: TsNamespace.FunctionLikeDeclarationBase): number {
    const ts = this.ts;
    if (!fn.body || !ts.isBlock(fn.body)) return 1;
    let n = 0;
    const visit = (node: TsNamespace.Node): void => {
      if (ts.isFunctionLike(node) || ts.isClassLike(node)) return;
      if (ts.isReturnStatement(node) && node.expression) n++;
      node.forEachChild(visit);
    };
    fn.body.forEachChild(visit);
    return n;
  }

  private localsOf(fn: TsNamespace.FunctionLikeDeclarationBase, scope: Scope): void {
    const ts = this.ts;
    const body = fn.body;
    if (!body || !ts.isBlock(body)) return;
    for (const st of body.statements) {
      if (!ts.isVariableStatement(st)) continue;
      for (const d of st.declarationList.declarations) {
        if (ts.isIdentifier(d.name) && d.initializer) scope.locals.set(d.name.text, this.value(d.initializer, scope));
      }
    }
  }

  functionValue(fn: TsNamespace.FunctionLikeDeclarationBase, scope?: Scope): Value {
    const inner: Scope = { kind: 'value', params: this.paramsOf(fn), locals: new Map(), parent: scope };
    this.localsOf(fn, inner);
    const r = this.returned(fn);
    return r ? { k: 'f', r: this.value(r, inner), t: this.text(fn) } : { k: 'f', t: this.text(fn) };
  }

  /** Facts of a function that may be a custom decorator: every call in its body. */
  functionFact(fn: TsNamespace.FunctionLikeDeclarationBase, name: string, exported: boolean, isDefault: boolean, line: number): FunctionFact | null {
    const ts = this.ts;
    const scope: Scope = { kind: 'fact', params: this.paramsOf(fn), locals: new Map() };
    this.localsOf(fn, scope);
    const calls: Value[] = [];
    const visit = (n: TsNamespace.Node, s: Scope): void => {
      if (ts.isCallExpression(n)) calls.push(this.value(n, s));
      if ((ts.isArrowFunction(n) || ts.isFunctionExpression(n) || ts.isFunctionDeclaration(n)) && n !== fn) {
        // an inner function: its own parameters are unknown (target, property key...), the outer ones still count
        const dead: Scope = { kind: 'dead', params: this.paramsOf(n), locals: new Map(), parent: s };
        n.forEachChild((c) => visit(c, dead));
        return;
      }
      n.forEachChild((c) => visit(c, s));
    };
    if (!fn.body) return null;
    visit(fn.body, scope);
    const r = this.returned(fn);
    // a function with no call is kept when it returns a value: a helper of decorator options
    if (calls.length === 0 && !r) return null;
    const defaults = fn.parameters.map((p) => (p.initializer ? this.value(p.initializer) : null));
    return {
      name, line, exported, isDefault, calls,
      ...(r ? { returns: this.value(r, scope) } : {}),
      ...(this.valueReturns(fn) > 1 ? { branched: true as const } : {}),
      ...(defaults.some((d) => d !== null) ? { defaults } : {}),
    };
  }

  // -------------------------------------------------------------------------------------------
  // Types

  design(node: TsNamespace.TypeNode | undefined, typeParams: Set<string>, inConditional = false): DesignType {
    const ts = this.ts;
    if (!node) return { k: 'c', n: 'Object' };
    while (ts.isParenthesizedTypeNode(node)) node = node.type;
    switch (node.kind) {
      case ts.SyntaxKind.VoidKeyword:
      case ts.SyntaxKind.UndefinedKeyword:
      case ts.SyntaxKind.NeverKeyword:
        return { k: 'v' };
      case ts.SyntaxKind.FunctionType:
      case ts.SyntaxKind.ConstructorType:
        return { k: 'c', n: 'Function' };
      case ts.SyntaxKind.ArrayType:
      case ts.SyntaxKind.TupleType:
        return { k: 'c', n: 'Array' };
      case ts.SyntaxKind.TypePredicate:
        return (node as TsNamespace.TypePredicateNode).assertsModifier ? { k: 'v' } : { k: 'c', n: 'Boolean' };
      case ts.SyntaxKind.BooleanKeyword:
        return { k: 'c', n: 'Boolean' };
      case ts.SyntaxKind.TemplateLiteralType:
      case ts.SyntaxKind.StringKeyword:
        return { k: 'c', n: 'String' };
      case ts.SyntaxKind.NumberKeyword:
        return { k: 'c', n: 'Number' };
      case ts.SyntaxKind.BigIntKeyword:
        return { k: 'c', n: 'BigInt' };
      case ts.SyntaxKind.SymbolKeyword:
        return { k: 'c', n: 'Symbol' };
      case ts.SyntaxKind.LiteralType: {
        const lit = (node as TsNamespace.LiteralTypeNode).literal;
        if (ts.isStringLiteral(lit) || ts.isNoSubstitutionTemplateLiteral(lit)) return { k: 'c', n: 'String' };
        if (ts.isNumericLiteral(lit) || ts.isPrefixUnaryExpression(lit)) return { k: 'c', n: 'Number' };
        if (ts.isBigIntLiteral(lit)) return { k: 'c', n: 'BigInt' };
        if (lit.kind === ts.SyntaxKind.TrueKeyword || lit.kind === ts.SyntaxKind.FalseKeyword) return { k: 'c', n: 'Boolean' };
        return { k: 'v' };
      }
      case ts.SyntaxKind.TypeReference: {
        const ref = node as TsNamespace.TypeReferenceNode;
        const name = ts.isIdentifier(ref.typeName) ? ref.typeName.text : ref.typeName.getText(this.sf);
        if (typeParams.has(name)) return { k: 'c', n: 'Object' };
        return inConditional ? { k: 'r', n: name, o: 1 } : { k: 'r', n: name };
      }
      case ts.SyntaxKind.UnionType:
      case ts.SyntaxKind.IntersectionType: {
        const types = (node as TsNamespace.UnionTypeNode).types;
        const m = types.map((t) => this.member(t, typeParams, inConditional));
        return node.kind === ts.SyntaxKind.IntersectionType ? { k: 'u', m, i: 1 } : { k: 'u', m };
      }
      case ts.SyntaxKind.ConditionalType: {
        const c = node as TsNamespace.ConditionalTypeNode;
        return { k: 'u', m: [this.member(c.trueType, typeParams, true), this.member(c.falseType, typeParams, true)] };
      }
      case ts.SyntaxKind.TypeOperator:
        if ((node as TsNamespace.TypeOperatorNode).operator === ts.SyntaxKind.ReadonlyKeyword) return this.design((node as TsNamespace.TypeOperatorNode).type, typeParams, inConditional);
        return { k: 'c', n: 'Object' };
      default:
        return { k: 'c', n: 'Object' };
    }
  }

  private member(node: TsNamespace.TypeNode, typeParams: Set<string>, inConditional: boolean): DesignMember {
    const ts = this.ts;
    while (ts.isParenthesizedTypeNode(node)) node = node.type;
    if (node.kind === ts.SyntaxKind.NeverKeyword) return { k: 'never' };
    if (node.kind === ts.SyntaxKind.UnknownKeyword) return { k: 'unknown' };
    if (node.kind === ts.SyntaxKind.AnyKeyword) return { k: 'any' };
    if (node.kind === ts.SyntaxKind.UndefinedKeyword) return { k: 'undef' };
    if (ts.isLiteralTypeNode(node) && node.literal.kind === ts.SyntaxKind.NullKeyword) return { k: 'null' };
    return this.design(node, typeParams, inConditional);
  }
}

// ---------------------------------------------------------------------------------------------
// Source files

const CONFIG_KEYS = ['type', 'synchronize', 'migrations', 'namingStrategy', 'database', 'host', 'url', 'autoLoadEntities', 'entityPrefix', 'subscribers', 'logging'];

function hasModifier(_ts: Ts, node: TsNamespace.Node, kind: TsNamespace.SyntaxKind): boolean {
  const mods = (node as { modifiers?: readonly TsNamespace.Node[] }).modifiers;
  if (!mods) return false;
  for (const m of mods) if (m.kind === kind) return true;
  return false;
}

function decoratorsOf(r: Reader, node: TsNamespace.Node): DecoratorUse[] {
  const ts = r.ts;
  const decos = ts.canHaveDecorators(node) ? ts.getDecorators(node) : undefined;
  if (!decos) return [];
  const out: DecoratorUse[] = [];
  for (const d of decos) {
    let e: TsNamespace.Expression = d.expression;
    while (ts.isParenthesizedExpression(e)) e = e.expression;
    if (ts.isCallExpression(e)) {
      const n = r.dotted(e.expression);
      if (n) out.push({ n, call: true, args: e.arguments.map((a) => r.value(a)), line: r.line(d) });
    } else {
      const n = r.dotted(e);
      if (n) out.push({ n, call: false, args: [], line: r.line(d) });
    }
  }
  return out;
}

function classFact(r: Reader, c: TsNamespace.ClassLikeDeclaration, exported: boolean, isDefault: boolean, fallbackName?: string): ClassFact {
  const ts = r.ts;
  const typeParams = new Set((c.typeParameters ?? []).map((t) => t.name.text));
  const fact: ClassFact = {
    name: c.name?.text ?? fallbackName ?? 'default',
    line: r.line(c.name ?? c),
    exported,
    isDefault,
    decorators: decoratorsOf(r, c),
    props: [],
  };
  if (hasModifier(ts, c, ts.SyntaxKind.AbstractKeyword)) fact.abstract = true;
  for (const h of c.heritageClauses ?? []) {
    if (h.token !== ts.SyntaxKind.ExtendsKeyword || !h.types[0]) continue;
    fact.base = r.value(h.types[0].expression);
  }
  const methods: string[] = [];
  for (const m of c.members) {
    if (ts.isPropertyDeclaration(m)) {
      if (hasModifier(ts, m, ts.SyntaxKind.StaticKeyword)) {
        const name = r.propName(m.name);
        if (name !== null && m.initializer) (fact.statics ??= []).push([name, r.value(m.initializer)]);
        continue;
      }
      const name = r.propName(m.name);
      if (name === null) continue;
      const prop: PropertyFact = { name, line: r.line(m.name), decorators: decoratorsOf(r, m), design: r.design(m.type, typeParams) };
      if (m.type) prop.typeText = r.text(m.type);
      if (m.questionToken) prop.optional = true;
      fact.props.push(prop);
    } else if ((ts.isMethodDeclaration(m) || ts.isGetAccessorDeclaration(m)) && m.name) {
      const name = r.propName(m.name);
      if (name !== null) methods.push(name);
    }
  }
  if (methods.length > 0) {
    fact.methods = methods;
    if (/snake/i.test(c.getText(r.sf))) fact.snake = true;
  }
  return fact;
}

function isRequireCall(ts: Ts, e: TsNamespace.Expression | undefined): string | null {
  if (!e || !ts.isCallExpression(e) || !ts.isIdentifier(e.expression) || e.expression.text !== 'require') return null;
  const a = e.arguments[0];
  return a && ts.isStringLiteral(a) ? a.text : null;
}

function isEntitySchemaNew(r: Reader, e: TsNamespace.Expression | undefined): TsNamespace.NewExpression | null {
  const ts = r.ts;
  if (!e) return null;
  while (ts.isParenthesizedExpression(e) || ts.isAsExpression(e) || ts.isSatisfiesExpression(e)) e = e.expression;
  if (!ts.isNewExpression(e)) return null;
  const n = r.dotted(e.expression);
  return n && /(^|\.)EntitySchema$/.test(n) ? e : null;
}

/** Object literals that look like data source options: an `entities` (or `autoLoadEntities`) key and another typical key. */
function findConfigs(r: Reader, facts: TypeormFileFacts): void {
  const ts = r.ts;
  const visit = (n: TsNamespace.Node): void => {
    if (ts.isObjectLiteralExpression(n)) {
      const keys = new Set<string>();
      for (const p of n.properties) {
        if ((ts.isPropertyAssignment(p) || ts.isShorthandPropertyAssignment(p) || ts.isMethodDeclaration(p)) && p.name) {
          const k = r.propName(p.name);
          if (k) keys.add(k);
        }
      }
      if ((keys.has('entities') || keys.has('autoLoadEntities')) && CONFIG_KEYS.some((k) => keys.has(k))) {
        facts.configs.push({ line: r.line(n), options: r.value(n), source: 'code' });
        return;
      }
      // `{ ...common, type: 'mysql', ... }`: the options of one database built on shared ones that
      // hold the entities (one object per database, chosen at run time): its type and naming count
      const literalType = (p: TsNamespace.ObjectLiteralElementLike): boolean => {
        if (!ts.isPropertyAssignment(p) || r.propName(p.name) !== 'type') return false;
        let e = p.initializer;
        while (ts.isParenthesizedExpression(e) || ts.isAsExpression(e) || ts.isSatisfiesExpression(e)) e = e.expression;
        return ts.isStringLiteralLike(e) && DATA_SOURCE_TYPES.has(e.text);
      };
      if (!keys.has('entities') && n.properties.some((p) => ts.isSpreadAssignment(p)) && n.properties.some(literalType)) {
        facts.configs.push({ line: r.line(n), options: r.value(n), source: 'code', settingsOnly: true });
        return;
      }
    }
    n.forEachChild(visit);
  };
  visit(r.sf);
}

function parseSource(file: SourceFile): FileFacts<TypeormFileFacts> {
  const ts = typescript();
  const kind = /\.[cm]?tsx?$/.test(file.path) ? (file.path.endsWith('x') ? ts.ScriptKind.TSX : ts.ScriptKind.TS) : file.path.endsWith('x') ? ts.ScriptKind.JSX : ts.ScriptKind.JS;
  const sf = ts.createSourceFile(file.path, file.text, ts.ScriptTarget.Latest, false, kind);
  const parseDiagnostics = (sf as unknown as { parseDiagnostics?: TsNamespace.DiagnosticWithLocation[] }).parseDiagnostics ?? [];
  if (parseDiagnostics.length > 0) {
    const d = parseDiagnostics[0]!;
    const pos = sf.getLineAndCharacterOfPosition(d.start);
    return {
      ok: false,
      diagnostics: [{
        severity: 'error', code: 'typeorm/syntax-error', file: file.path, line: pos.line + 1, column: pos.character + 1,
        message: `syntax error: ${ts.flattenDiagnosticMessageText(d.messageText, ' ')}${parseDiagnostics.length > 1 ? ` (and ${parseDiagnostics.length - 1} more)` : ''}`,
      }],
    };
  }
  const r = new Reader(sf);
  const facts = emptyFacts('source');
  const exportedLocals = new Set<string>();
  for (const st of sf.statements) {
    const exported = hasModifier(ts, st, ts.SyntaxKind.ExportKeyword);
    const isDefault = hasModifier(ts, st, ts.SyntaxKind.DefaultKeyword);
    if (ts.isImportDeclaration(st)) {
      if (!ts.isStringLiteral(st.moduleSpecifier)) continue;
      const imp: ImportFact = { from: st.moduleSpecifier.text, names: [] };
      const clause = st.importClause;
      if (clause) {
        if (clause.isTypeOnly) imp.typeOnly = true;
        if (clause.name) imp.def = clause.name.text;
        const nb = clause.namedBindings;
        if (nb && ts.isNamespaceImport(nb)) imp.ns = nb.name.text;
        else if (nb) for (const el of nb.elements) imp.names.push([el.name.text, (el.propertyName ?? el.name).text]);
      }
      facts.imports.push(imp);
    } else if (ts.isImportEqualsDeclaration(st)) {
      const ref = st.moduleReference;
      if (ts.isExternalModuleReference(ref) && ts.isStringLiteral(ref.expression)) facts.imports.push({ from: ref.expression.text, names: [], ns: st.name.text });
    } else if (ts.isExportDeclaration(st)) {
      const from = st.moduleSpecifier && ts.isStringLiteral(st.moduleSpecifier) ? st.moduleSpecifier.text : undefined;
      const ex: ExportFact = from ? { from } : {};
      if (st.exportClause && ts.isNamedExports(st.exportClause)) ex.names = st.exportClause.elements.map((el) => [el.name.text, (el.propertyName ?? el.name).text]);
      else if (st.exportClause && ts.isNamespaceExport(st.exportClause)) ex.ns = st.exportClause.name.text;
      facts.exports.push(ex);
    } else if (ts.isExportAssignment(st)) {
      const e = st.expression;
      const schema = isEntitySchemaNew(r, e);
      if (schema) facts.schemas.push({ line: r.line(schema), exported: true, isDefault: true, options: schema.arguments?.[0] ? r.value(schema.arguments[0]) : { k: 'u' } });
      else if (ts.isClassExpression(e)) facts.classes.push(classFact(r, e, true, true));
      else facts.defaultExport = r.value(e);
    } else if (ts.isClassDeclaration(st)) {
      facts.classes.push(classFact(r, st, exported, isDefault));
    } else if (ts.isFunctionDeclaration(st)) {
      const f = r.functionFact(st, st.name?.text ?? 'default', exported, isDefault, r.line(st));
      if (f) facts.functions.push(f);
    } else if (ts.isEnumDeclaration(st)) {
      const members: Array<[string, string | number | null]> = [];
      let next: number | null = 0;
      for (const m of st.members) {
        const name = r.propName(m.name) ?? m.name.getText(sf);
        let v: string | number | null = null;
        if (!m.initializer) v = next;
        else {
          const iv = r.value(m.initializer);
          if (iv.k === 'l' && (typeof iv.v === 'string' || typeof iv.v === 'number')) v = iv.v;
          else if (iv.k === 'r') {
            const prev = members.find(([n]) => n === iv.n);
            v = prev ? prev[1] : null;
          }
        }
        members.push([name, v]);
        next = typeof v === 'number' ? v + 1 : null;
      }
      facts.enums.push({ name: st.name.text, line: r.line(st), exported, members });
    } else if (ts.isTypeAliasDeclaration(st)) {
      const tp = new Set((st.typeParameters ?? []).map((t) => t.name.text));
      facts.aliases.push({ name: st.name.text, exported, design: r.design(st.type, tp) });
    } else if (ts.isInterfaceDeclaration(st)) {
      facts.aliases.push({ name: st.name.text, exported, design: { k: 'c', n: 'Object' } });
    } else if (ts.isVariableStatement(st)) {
      for (const d of st.declarationList.declarations) {
        const req = isRequireCall(ts, d.initializer);
        if (req !== null) {
          if (ts.isIdentifier(d.name)) facts.imports.push({ from: req, names: [], ns: d.name.text });
          else if (ts.isObjectBindingPattern(d.name)) {
            const names: Array<[string, string]> = [];
            for (const el of d.name.elements) {
              if (!ts.isIdentifier(el.name)) continue;
              const imported = el.propertyName && ts.isIdentifier(el.propertyName) ? el.propertyName.text : el.name.text;
              names.push([el.name.text, imported]);
            }
            facts.imports.push({ from: req, names });
          }
          continue;
        }
        if (!ts.isIdentifier(d.name)) continue;
        const name = d.name.text;
        let init = d.initializer;
        while (init && (ts.isParenthesizedExpression(init) || ts.isAsExpression(init) || ts.isSatisfiesExpression(init))) init = init.expression;
        const schema = isEntitySchemaNew(r, init);
        if (schema) {
          facts.schemas.push({ name, line: r.line(d), exported, isDefault: false, options: schema.arguments?.[0] ? r.value(schema.arguments[0]) : { k: 'u' } });
          continue;
        }
        if (init && (ts.isArrowFunction(init) || ts.isFunctionExpression(init))) {
          const f = r.functionFact(init, name, exported, false, r.line(d));
          if (f) facts.functions.push(f);
          continue;
        }
        if (init && ts.isClassExpression(init)) {
          facts.classes.push(classFact(r, init, exported, false, name));
          continue;
        }
        if (init) facts.consts.push({ name, line: r.line(d), exported, value: r.value(init) });
      }
    } else if (ts.isExpressionStatement(st) && ts.isBinaryExpression(st.expression) && st.expression.operatorToken.kind === ts.SyntaxKind.EqualsToken) {
      // CommonJS exports: module.exports = X, exports.Name = X, module.exports.Name = X
      const left = r.dotted(st.expression.left as TsNamespace.Expression);
      const right = st.expression.right;
      if (left === 'module.exports' || left === 'exports.default' || left === 'module.exports.default') {
        const schema = isEntitySchemaNew(r, right);
        if (schema) facts.schemas.push({ line: r.line(schema), exported: true, isDefault: true, options: schema.arguments?.[0] ? r.value(schema.arguments[0]) : { k: 'u' } });
        else facts.defaultExport = r.value(right);
      } else if (left && /^(module\.)?exports\.\w+$/.test(left)) {
        const name = left.slice(left.lastIndexOf('.') + 1);
        const schema = isEntitySchemaNew(r, right);
        if (schema) facts.schemas.push({ name, line: r.line(schema), exported: true, isDefault: false, options: schema.arguments?.[0] ? r.value(schema.arguments[0]) : { k: 'u' } });
        else if (ts.isIdentifier(right)) exportedLocals.add(`${name}\u0000${right.text}`);
        else facts.consts.push({ name, line: r.line(st), exported: true, value: r.value(right) });
      }
    }
  }
  if (exportedLocals.size > 0) facts.exports.push({ names: [...exportedLocals].map((p) => p.split('\u0000') as [string, string]) });
  if (file.text.includes('ntities')) findConfigs(r, facts);
  return { ok: true, facts };
}

// ---------------------------------------------------------------------------------------------
// JSON, environment and tsconfig files

function jsonToValue(v: unknown): Value {
  if (v === null) return { k: 'l', v: null };
  if (Array.isArray(v)) return { k: 'a', e: v.map(jsonToValue) };
  if (typeof v === 'object') return { k: 'o', p: Object.entries(v as Record<string, unknown>).map(([k, x]) => [k, jsonToValue(x)]) };
  if (typeof v === 'string' || typeof v === 'number' || typeof v === 'boolean') return { k: 'l', v };
  return { k: 'u' };
}

function readJson(file: SourceFile): { ok: true; value: unknown } | { ok: false; diagnostic: Diagnostic } {
  const ts = typescript();
  const r = ts.parseConfigFileTextToJson(file.path, file.text);
  if (r.error) {
    const pos = r.error.file && r.error.start !== undefined ? r.error.file.getLineAndCharacterOfPosition(r.error.start) : undefined;
    return {
      ok: false,
      diagnostic: {
        severity: 'error', code: 'typeorm/json-error', file: file.path, ...(pos ? { line: pos.line + 1 } : {}),
        message: `not valid JSON: ${ts.flattenDiagnosticMessageText(r.error.messageText, ' ')}`,
      },
    };
  }
  return { ok: true, value: r.config };
}

function parseTsconfig(file: SourceFile): FileFacts<TypeormFileFacts> {
  const got = readJson(file);
  if (!got.ok) return { ok: false, diagnostics: [got.diagnostic] };
  const facts = emptyFacts('tsconfig');
  const cfg = (got.value ?? {}) as { extends?: unknown; compilerOptions?: Record<string, unknown> };
  const co = cfg.compilerOptions ?? {};
  const t: TsconfigFact = {};
  if (typeof cfg.extends === 'string') t.extends = [cfg.extends];
  else if (Array.isArray(cfg.extends)) t.extends = cfg.extends.filter((x): x is string => typeof x === 'string');
  if (typeof co.strict === 'boolean') t.strict = co.strict;
  if (typeof co.strictNullChecks === 'boolean') t.strictNullChecks = co.strictNullChecks;
  if (typeof co.baseUrl === 'string') t.baseUrl = co.baseUrl;
  if (typeof co.outDir === 'string') t.outDir = co.outDir;
  if (typeof co.rootDir === 'string') t.rootDir = co.rootDir;
  if (co.paths && typeof co.paths === 'object') {
    const paths: Record<string, string[]> = {};
    for (const [k, v] of Object.entries(co.paths as Record<string, unknown>)) if (Array.isArray(v)) paths[k] = v.filter((x): x is string => typeof x === 'string');
    t.paths = paths;
  }
  facts.tsconfig = t;
  return { ok: true, facts };
}

function parseOrmconfigJson(file: SourceFile): FileFacts<TypeormFileFacts> {
  const got = readJson(file);
  if (!got.ok) return { ok: false, diagnostics: [got.diagnostic] };
  const facts = emptyFacts('config');
  const list = Array.isArray(got.value) ? got.value : [got.value];
  for (const o of list) if (o && typeof o === 'object') facts.configs.push({ line: 1, options: jsonToValue(o), source: 'ormconfig' });
  return { ok: true, facts };
}

const ENV_KEYS: Record<string, string> = {
  TYPEORM_CONNECTION: 'type',
  TYPEORM_ENTITIES: 'entities',
  TYPEORM_ENTITY_PREFIX: 'entityPrefix',
  TYPEORM_SCHEMA: 'schema',
};

function parseEnv(file: SourceFile): FileFacts<TypeormFileFacts> {
  const facts = emptyFacts('config');
  const p: Array<[string, Value]> = [];
  file.text.split(/\r?\n/).forEach((line) => {
    const m = /^\s*(?:export\s+)?([A-Z_]+)\s*=\s*(.*?)\s*$/.exec(line);
    if (!m || !ENV_KEYS[m[1]!]) return;
    const raw = m[2]!.replace(/^(['"])(.*)\1$/, '$2');
    const key = ENV_KEYS[m[1]!]!;
    p.push([key, key === 'entities' ? { k: 'a', e: raw.split(',').map((s) => ({ k: 'l' as const, v: s.trim() })) } : { k: 'l', v: raw }]);
  });
  if (p.some(([k]) => k === 'entities')) facts.configs.push({ line: 1, options: { k: 'o', p }, source: 'env' });
  return { ok: true, facts };
}

const basename = (p: string): string => p.slice(p.lastIndexOf('/') + 1);

/** Whether a path is one of TypeORM's configuration files (read as data). */
export function isOrmconfigPath(p: string): boolean {
  return /^ormconfig\.(json|js|cjs|mjs|ts|env|ya?ml)$/.test(basename(p)) || basename(p) === '.env';
}

/**
 * Whether a path is a tsconfig file: `tsconfig*.json` (the adapter's watch list), so that a base
 * such as `tsconfig-base.json` or `tsconfig_node.json` that an `extends` names is read as one.
 */
export function isTsconfigPath(p: string): boolean {
  return /^tsconfig[^/]*\.json$/.test(basename(p));
}

/** The facts of one file (source, tsconfig or TypeORM configuration), from its text alone. */
export function parseTypeormFile(file: SourceFile): FileFacts<TypeormFileFacts> {
  const name = basename(file.path);
  try {
    if (isTsconfigPath(file.path)) return parseTsconfig(file);
    if (name === 'ormconfig.json') return parseOrmconfigJson(file);
    if (name === 'package.json') {
      // a workspace package that imports resolve into (see typeorm-locate.ts): its name and entries
      const facts = emptyFacts('package');
      const pkg = parsePackageJson(file.text);
      if (pkg) facts.package = pkg;
      return { ok: true, facts };
    }
    if (name === 'ormconfig.env' || name === '.env') return parseEnv(file);
    if (/^ormconfig\.ya?ml$/.test(name)) {
      return {
        ok: true,
        facts: emptyFacts('config'),
        diagnostics: [{ severity: 'warning', code: 'typeorm/yaml-config', file: file.path, message: `${file.path}: YAML configuration files are not read; name the entity files with --path` }],
      };
    }
    const got = parseSource(file);
    if (got.ok && /^ormconfig\./.test(name)) for (const c of got.facts.configs) c.source = 'ormconfig';
    // (facts are kept for the run: a copy, not slices of the text, see core's `detach`)
    if (got.ok) got.facts = detach(got.facts);
    return got;
  } catch (e) {
    return { ok: false, diagnostics: [{ severity: 'error', code: 'typeorm/parse-failure', file: file.path, message: `could not read ${file.path}: ${(e as Error).message}` }] };
  }
}
