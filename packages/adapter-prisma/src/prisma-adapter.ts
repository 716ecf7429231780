import type { AdapterOptionValues, AssembleInput, AssembleResult, Diagnostic, SchemaAdapter } from '@schema-strata/core/extract';
import { assembleSchema, datasourceInfo, runMemo, type JoinKeyRule, type RunMemo } from './prisma-assemble.js';
import { PRISMA_OPTIONS } from './prisma-config.js';
import { locatePrisma, PRISMA_WATCH } from './prisma-locate.js';
import { modernise, parseWithEngine, unknownPreviewFeatures } from './prisma-parse.js';
import { rescanFile, scanFile, scanSchema } from './prisma-scan.js';
import { ADAPTER_VERSION } from './version.js';
import { renderPrismaDemo } from './prisma-demo.js';

/**
 * Build the snapshot of one version from the text of its schema files. The files form one
 * schema (Prisma parses a multi-file schema as one unit), so a parse error fails the whole
 * version, which core then marks `carried`.
 */
export function assemblePrisma(input: AssembleInput<unknown>, options: AdapterOptionValues, memo?: RunMemo): AssembleResult {
  const files = input.files.map((f) => ({ path: f.path, text: f.text ?? '' }));
  if (files.every((f) => f.text.trim() === '')) {
    return {
      failed: true,
      diagnostics: files.map((f) => ({ severity: 'error' as const, code: 'prisma/empty-schema', file: f.path, message: `${f.path} is empty` })),
    };
  }
  const blocks = files.flatMap((f) => {
    if (!memo) return scanSchema(f.path, f.text);
    // from the file's scan at the version before, when there is one: only what changed is scanned
    const before = memo.scans.get(f.path);
    const scan = before ? rescanFile(before, f.text) : scanFile(f.path, f.text);
    memo.scans.set(f.path, scan);
    return scan.blocks;
  });
  const ds = datasourceInfo(blocks);
  if (ds.provider === 'mongodb') {
    return {
      failed: true,
      diagnostics: [{
        severity: 'error', code: 'prisma/mongodb-unsupported', ...(ds.file ? { file: ds.file } : {}), ...(ds.line ? { line: ds.line } : {}),
        message: 'the datasource provider is mongodb, which has no relational tables; schema-strata analyses relational schemas only',
      }],
    };
  }
  let parsed = parseWithEngine(files.map((f) => ({ path: f.path, text: modernise(f.text).text })));
  const notes: Diagnostic[] = [];
  const unknown = parsed.ok ? new Set<string>() : unknownPreviewFeatures(parsed.diagnostics);
  if (unknown.size > 0) {
    // a preview feature of an older Prisma that the current engine no longer knows: leave it out and parse again
    parsed = parseWithEngine(files.map((f) => ({ path: f.path, text: modernise(f.text, { dropPreviewFeatures: unknown }).text })));
    notes.push({
      severity: 'info', code: 'prisma/preview-feature-dropped',
      message: `preview feature${unknown.size > 1 ? 's' : ''} ${[...unknown].sort().join(', ')} of an older Prisma left out: the engine of this adapter no longer knows ${unknown.size > 1 ? 'them' : 'it'}`,
    });
  }
  if (!parsed.ok) return { failed: true, diagnostics: parsed.diagnostics };
  const { snapshot, diagnostics } = assembleSchema(parsed.datamodel, blocks, {
    provider: ds.provider ?? 'postgresql',
    relationMode: ds.relationMode,
    joinKey: (options['prisma-join-key'] as JoinKeyRule | undefined) ?? 'auto',
  }, memo);
  if (!ds.provider) {
    diagnostics.push({ severity: 'info', code: 'prisma/no-datasource', message: 'no datasource block: types follow PostgreSQL' });
  }
  diagnostics.unshift(...notes);
  return { snapshot, diagnostics };
}

/**
 * The Prisma adapter: finds the schema as Prisma's CLI would and parses it with Prisma's own
 * schema engine (its WebAssembly build), offline, without running any code of the project.
 *
 * @example
 * ```ts
 * import { extractHistory } from '@schema-strata/core/extract';
 * import prisma from '@schema-strata/adapter-prisma';
 *
 * const history = await extractHistory({ repo: '.', adapter: prisma });
 * console.log(history.versions.length, 'versions');
 * ```
 */
export const prismaAdapter: SchemaAdapter = Object.freeze<SchemaAdapter>({
  name: 'prisma',
  version: ADAPTER_VERSION,
  description: "Prisma schema files (single file, multi-file folders), parsed with Prisma's own engine",
  options: PRISMA_OPTIONS,
  watch: PRISMA_WATCH,
  locate: locatePrisma,
  assemble: (input, options) => assemblePrisma(input, options),
  /** A run's session remembers the previous version's tables, so that unchanged models are not converted again. */
  createSession: (options) => {
    const memo = runMemo();
    return {
      assemble(input) {
        const previous = memo.previous;
        memo.next = new Map();
        const result = assemblePrisma(input, options, memo);
        memo.previous = 'failed' in result ? previous : memo.next;
        return result;
      },
    };
  },
  renderDemo: renderPrismaDemo,
});
