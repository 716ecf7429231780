import { createRequire } from 'node:module';
import { posix } from 'node:path';
import { BlobMemo, type Located, type LocateRequest, type TreeView } from '@schema-strata/core/extract';

const CONFIG_NAMES = ['prisma.config.ts', 'prisma.config.mts', 'prisma.config.cts', 'prisma.config.js', 'prisma.config.mjs', 'prisma.config.cjs'];

/** Paths that can matter to locating or reading a Prisma schema. */
export const PRISMA_WATCH = ['**/*.prisma', '**/package.json', ...CONFIG_NAMES.map((n) => `**/${n}`)];

type TsModule = typeof import('ts-morph').ts;
let tsModule: TsModule | null = null;
function ts(): TsModule {
  if (!tsModule) {
    const require = createRequire(import.meta.url);
    tsModule = (require('ts-morph') as typeof import('ts-morph')).ts;
  }
  return tsModule;
}

/** Memo of the schema path a config text states, by blob id (configs rarely change). */
const configMemo = new BlobMemo<string | null>();
const packageMemo = new Map<string, string | null>();

/**
 * The `schema` a prisma.config file states, read as a syntax tree (never executed): a string
 * literal, or `path.join(...)` / `path.resolve(...)` / `join(...)` of string literals
 * (`__dirname` and `import.meta.dirname` arguments are the config's own directory), or a
 * top-level variable holding one of these (or holding the whole config object).
 */
export function schemaFromConfig(text: string): string | null {
  const t = ts();
  const sf = t.createSourceFile('prisma.config.ts', text, t.ScriptTarget.Latest, true, t.ScriptKind.TS);
  let found: string | null = null;
  /** The initializer of a top-level `const NAME = ...` (a variable holding the config or the path). */
  const constant = (name: string): import('ts-morph').ts.Expression | undefined => {
    for (const st of sf.statements) {
      if (!t.isVariableStatement(st)) continue;
      for (const d of st.declarationList.declarations) if (d.name.getText(sf) === name && d.initializer) return d.initializer;
    }
    return undefined;
  };
  let depth = 0;
  const evalExpr = (e: import('ts-morph').ts.Expression): string | null => {
    while (t.isParenthesizedExpression(e) || t.isAsExpression(e) || t.isSatisfiesExpression(e)) e = e.expression;
    if (t.isStringLiteral(e) || t.isNoSubstitutionTemplateLiteral(e)) return e.text;
    if (t.isIdentifier(e) && depth < 8) {
      const init = constant(e.text);
      if (!init) return null;
      depth++;
      try {
        return evalExpr(init);
      } finally {
        depth--;
      }
    }
    if (t.isCallExpression(e)) {
      const callee = e.expression.getText(sf);
      if (/^(path\.)?(join|resolve)$/.test(callee) || /^(path\.posix\.)(join|resolve)$/.test(callee)) {
        const parts: string[] = [];
        for (const a of e.arguments) {
          const at = a.getText(sf);
          if (at === '__dirname' || at === 'import.meta.dirname' || at === 'process.cwd()') continue;
          const v = evalExpr(a);
          if (v === null) return null;
          parts.push(v);
        }
        return posix.join(...parts);
      }
    }
    return null;
  };
  const fromObject = (o: import('ts-morph').ts.ObjectLiteralExpression): void => {
    for (const p of o.properties) {
      if (t.isPropertyAssignment(p) && p.name.getText(sf).replace(/['"]/g, '') === 'schema') {
        found = evalExpr(p.initializer);
        return;
      }
      if (t.isShorthandPropertyAssignment(p) && p.name.text === 'schema') {
        found = evalExpr(p.name);
        return;
      }
    }
  };
  const fromExport = (e: import('ts-morph').ts.Expression): void => {
    while (t.isParenthesizedExpression(e) || t.isAsExpression(e) || t.isSatisfiesExpression(e)) e = e.expression;
    if (t.isObjectLiteralExpression(e)) fromObject(e);
    else if (t.isCallExpression(e) && e.arguments[0]) fromExport(e.arguments[0]);
    else if (t.isIdentifier(e)) {
      // export default config; -> const config = {...}
      const init = constant(e.text);
      if (init && depth < 8) {
        depth++;
        fromExport(init);
        depth--;
      }
    }
  };
  for (const st of sf.statements) {
    if (t.isExportAssignment(st)) fromExport(st.expression);
    if (t.isExpressionStatement(st) && t.isBinaryExpression(st.expression)) {
      const left = st.expression.left.getText(sf);
      if (left === 'module.exports' || left === 'exports.default') fromExport(st.expression.right);
    }
  }
  return found;
}

/** `prisma.schema` of a package.json, or null. */
export function schemaFromPackageJson(text: string): string | null {
  try {
    const pkg = JSON.parse(text) as { prisma?: { schema?: unknown } };
    return typeof pkg?.prisma?.schema === 'string' ? pkg.prisma.schema : null;
  } catch {
    return null;
  }
}

const isPrisma = (p: string): boolean => p.endsWith('.prisma');

/** The .prisma files a schema path names: a file, or every .prisma file under a directory. */
function filesAt(tree: TreeView, path: string): string[] {
  const p = posix.normalize(path).replace(/^\.\//, '').replace(/\/+$/, '');
  if (tree.has(p)) return [p];
  return tree.under(p).filter(isPrisma);
}

interface Resolution {
  files: string[];
  consulted: string[];
}

/**
 * Where Prisma's CLI would find the schema when run in `dir` (Prisma docs, "Schema location"):
 * the `schema` of a prisma.config file, then `prisma.schema` of package.json, then the default
 * locations ./prisma/schema.prisma and ./schema.prisma, then the folder ./prisma/schema.
 */
async function resolveIn(tree: TreeView, dir: string): Promise<Resolution | null> {
  const at = (p: string): string => (dir ? `${dir}/${p}` : p);
  const consulted: string[] = [];
  for (const name of CONFIG_NAMES) {
    const path = at(name);
    const blob = tree.blob(path);
    if (!blob) continue;
    consulted.push(path);
    const schema = await configMemo.of(tree, path, (text) => (text === undefined ? null : schemaFromConfig(text)));
    if (schema) {
      const files = filesAt(tree, at(schema));
      if (files.length > 0) return { files, consulted };
    }
    break;
  }
  const pkgPath = at('package.json');
  const pkgBlob = tree.blob(pkgPath);
  if (pkgBlob) {
    let schema = packageMemo.get(pkgBlob);
    if (schema === undefined) {
      const text = await tree.read(pkgPath);
      schema = text === undefined ? null : schemaFromPackageJson(text);
      packageMemo.set(pkgBlob, schema);
    }
    if (schema) {
      consulted.push(pkgPath);
      const files = filesAt(tree, at(schema));
      if (files.length > 0) return { files, consulted };
    }
  }
  for (const d of ['prisma/schema.prisma', 'schema.prisma']) {
    if (tree.has(at(d))) return { files: [at(d)], consulted };
  }
  const folder = tree.under(at('prisma/schema')).filter(isPrisma);
  if (folder.length > 0) return { files: folder, consulted };
  return null;
}

export const SEARCHED =
  'prisma.config.* `schema`, package.json `prisma.schema`, prisma/schema.prisma, schema.prisma and prisma/schema/ (at the root, then in each package of a monorepo)';

/**
 * Locate the Prisma schema of one commit as Prisma would: at the repository root first; when
 * the root has none, in the packages of a monorepo (each directory with a package.json) and at
 * any other `schema.prisma`. Exactly one candidate is taken; several independent ones are
 * reported as ambiguous, never merged.
 */
export async function locatePrisma(tree: TreeView, req: LocateRequest): Promise<Located> {
  if (req.paths) {
    // the .prisma files among what the user named; any file, when the user named no .prisma file
    const named = req.paths.filter((p) => tree.has(p));
    const prisma = named.filter(isPrisma);
    return { files: prisma.length > 0 ? prisma : named };
  }
  const root = await resolveIn(tree, '');
  if (root) return { files: root.files, consulted: root.consulted, searched: SEARCHED };

  const all = [...tree.paths()];
  const candidates = new Map<string, Resolution>();
  const packageDirs = all.filter((p) => p.endsWith('/package.json')).map((p) => posix.dirname(p)).sort();
  for (const dir of packageDirs) {
    const r = await resolveIn(tree, dir);
    if (r) candidates.set(r.files.join('\n'), r);
  }
  const covered = new Set([...candidates.values()].flatMap((r) => r.files));
  for (const p of all) {
    if (posix.basename(p) !== 'schema.prisma' || covered.has(p)) continue;
    const dir = posix.dirname(p);
    // a schema.prisma inside a folder-based schema belongs to that folder
    const inFolder = posix.basename(dir) === 'schema' ? tree.under(dir).filter(isPrisma) : [p];
    if (inFolder.some((f) => covered.has(f))) continue;
    candidates.set(inFolder.join('\n'), { files: inFolder, consulted: [] });
    for (const f of inFolder) covered.add(f);
  }
  if (candidates.size === 0) return { files: [], searched: SEARCHED };
  if (candidates.size === 1) {
    const [only] = [...candidates.values()];
    return { files: only!.files, consulted: only!.consulted, searched: SEARCHED };
  }
  const list = [...candidates.values()].map((c) => (c.files.length === 1 ? c.files : [commonDir(c.files) + '/']));
  return {
    files: [],
    ambiguous: {
      candidates: list,
      hint: `--path ${list[0]!.join(' ')} (or another of them)`,
    },
    searched: SEARCHED,
  };
}

function commonDir(files: string[]): string {
  let dir = posix.dirname(files[0]!);
  while (dir !== '.' && !files.every((f) => f.startsWith(dir + '/'))) dir = posix.dirname(dir);
  return dir;
}
