// A synthetic Prisma history for benchmarks: a schema that grows from a handful of models to
// `models` over `commits` commits, with the edits real histories have (columns added, removed
// and retyped, relations added, models added and dropped), formatting-only commits, reverts,
// and commits that touch only other files (about `1 - schemaShare` of them: application code,
// version bumps in package.json). Deterministic: the same options give the same
// repository, byte for byte.
import { writeRepository, appendCommits } from '@schema-strata/core';
import { rng } from './rng.js';

export { rng };

const SCALARS = ['Int', 'String', 'Boolean', 'DateTime', 'Decimal', 'Float', 'BigInt', 'Json'];
const NOUNS = ['tool', 'loan', 'member', 'repair', 'shelf', 'fee', 'visit', 'note', 'badge', 'slot', 'kit', 'part', 'drill', 'saw', 'ladder', 'rack', 'bin', 'shift', 'event', 'review'];

function modelName(i) {
  const n = NOUNS[i % NOUNS.length];
  return n[0].toUpperCase() + n.slice(1) + (i >= NOUNS.length ? String(Math.floor(i / NOUNS.length)) : '');
}

function clone(state) {
  return { nextModel: state.nextModel, nextField: state.nextField, models: state.models.map((m) => ({ ...m, fields: m.fields.map((f) => ({ ...f })), relations: m.relations.map((r) => ({ ...r })) })) };
}

function newModel(state, r) {
  const i = state.nextModel++;
  const m = { name: modelName(i), table: `t_${i}`, fields: [], relations: [] };
  const n = 3 + Math.floor(r() * 6);
  for (let k = 0; k < n; k++) m.fields.push(newField(state, r));
  if (state.models.length > 0 && r() < 0.7) {
    const target = state.models[Math.floor(r() * state.models.length)];
    m.relations.push({ field: `${target.name.toLowerCase()}Ref`, target: target.name, optional: r() < 0.5 });
  }
  state.models.push(m);
}

function newField(state, r) {
  const type = SCALARS[Math.floor(r() * SCALARS.length)];
  return { name: `f${state.nextField++}`, type, optional: r() < 0.3, len: type === 'String' && r() < 0.5 ? 40 + Math.floor(r() * 8) * 20 : undefined };
}

function render(state, formatting) {
  const pad = formatting % 2 === 1;
  const out = ['datasource db {', '  provider = "postgresql"', '  url      = env("DATABASE_URL")', '}', '', 'generator client {', '  provider = "prisma-client-js"', '}', ''];
  const back = new Map();
  for (const m of state.models) for (const rel of m.relations) {
    if (!back.has(rel.target)) back.set(rel.target, []);
    back.get(rel.target).push(m);
  }
  for (const m of state.models) {
    out.push(`model ${m.name} {`);
    const rows = [['id', 'Int', '@id @default(autoincrement())']];
    for (const f of m.fields) rows.push([f.name, f.type + (f.optional ? '?' : ''), f.len ? `@db.VarChar(${f.len})` : '']);
    for (const rel of m.relations) {
      rows.push([`${rel.field}Id`, 'Int' + (rel.optional ? '?' : ''), '']);
      rows.push([rel.field, rel.target + (rel.optional ? '?' : ''), `@relation("${m.name}_${rel.field}", fields: [${rel.field}Id], references: [id])`]);
    }
    for (const other of back.get(m.name) ?? []) {
      for (const rel of other.relations.filter((x) => x.target === m.name)) rows.push([`${other.name.toLowerCase()}_${rel.field}`, `${other.name}[]`, `@relation("${other.name}_${rel.field}")`]);
    }
    const w0 = Math.max(...rows.map((r) => r[0].length));
    const w1 = Math.max(...rows.map((r) => r[1].length));
    for (const r of rows) out.push(pad ? `  ${r[0].padEnd(w0)} ${r[1].padEnd(w1)} ${r[2]}`.trimEnd() : `  ${r[0]} ${r[1]} ${r[2]}`.trimEnd());
    out.push('', `  @@map("${m.table}")`, '}', '');
  }
  return out.join('\n');
}

/** Apply one random schema edit. */
function edit(state, r, maxModels, progress) {
  const want = Math.min(maxModels, 8 + Math.floor(progress * (maxModels - 8)));
  const x = r();
  if (state.models.length < want && x < 0.5) return newModel(state, r), 'add model';
  const m = state.models[Math.floor(r() * state.models.length)];
  if (x < 0.7) return m.fields.push(newField(state, r)), `add column to ${m.name}`;
  if (x < 0.78 && m.fields.length > 2) return m.fields.splice(Math.floor(r() * m.fields.length), 1), `drop column of ${m.name}`;
  if (x < 0.86 && m.fields.length > 0) {
    const f = m.fields[Math.floor(r() * m.fields.length)];
    if (f.type === 'String') f.len = (f.len ?? 40) + 20;
    else f.type = SCALARS[(SCALARS.indexOf(f.type) + 1) % SCALARS.length];
    return `retype a column of ${m.name}`;
  }
  if (x < 0.93 && state.models.length > 1) {
    const target = state.models[Math.floor(r() * state.models.length)];
    if (target !== m && !m.relations.some((rel) => rel.target === target.name)) {
      m.relations.push({ field: `${target.name.toLowerCase()}Ref`, target: target.name, optional: true });
      return `relate ${m.name} to ${target.name}`;
    }
  }
  if (x < 0.95 && state.models.length > 10) {
    // drop a model nobody references
    const referenced = new Set(state.models.flatMap((mm) => mm.relations.map((rel) => rel.target)));
    const victim = state.models.find((mm) => !referenced.has(mm.name) && mm !== state.models[0]);
    if (victim) {
      state.models = state.models.filter((mm) => mm !== victim);
      return `drop model ${victim.name}`;
    }
  }
  m.fields.push(newField(state, r));
  return `add column to ${m.name}`;
}

/**
 * The commits of a synthetic history. Each commit holds the files it writes; the schema file
 * is `prisma/schema.prisma`.
 */
export function prismaHistoryCommits({ commits = 2000, models = 150, seed = 7, startDate = Date.UTC(2019, 0, 1), schemaShare = 0.5 } = {}) {
  const r = rng(seed);
  let state = { nextModel: 0, nextField: 0, models: [] };
  for (let i = 0; i < 5; i++) newModel(state, r);
  const history = [clone(state)];
  let formatting = 0;
  const out = [];
  const at = (i) => new Date(startDate + i * 3 * 3600 * 1000).toISOString().replace(/\.\d{3}Z$/, '+00:00');
  out.push({ date: at(0), message: 'initial schema', files: { 'prisma/schema.prisma': render(state, formatting), 'package.json': '{\n  "name": "bench-app",\n  "version": "1.0.0"\n}\n', 'README.md': 'bench\n' } });
  for (let i = 1; i < commits; i++) {
    const x = r();
    let message;
    if (x < 0.06) {
      formatting++;
      message = 'format the schema';
    } else if (x < 0.09 && history.length > 3) {
      state = clone(history[history.length - 2]);
      message = 'revert the previous schema change';
    } else if (x < 0.09 + (1 - schemaShare)) {
      // application code: most commits of a real history do not touch the schema
      out.push({ date: at(i), message: `app change ${i}`, files: { [`src/module${i % 40}.ts`]: `export const revision = ${i};\n` } });
      continue;
    } else if (x < 0.11 + (1 - schemaShare)) {
      out.push({ date: at(i), message: `bump version ${i}`, files: { 'package.json': `{\n  "name": "bench-app",\n  "version": "1.0.${i}"\n}\n` } });
      continue;
    } else {
      message = edit(state, r, models, i / commits);
    }
    history.push(clone(state));
    out.push({ date: at(i), message, files: { 'prisma/schema.prisma': render(state, formatting) } });
  }
  return { commits: out, state, formatting, at, r };
}

/** Write the synthetic history to `dir`. Returns a function that appends one more schema commit. */
export async function makePrismaHistory(dir, opts = {}) {
  const h = prismaHistoryCommits(opts);
  await writeRepository(dir, h.commits, { checkout: false });
  let n = h.commits.length;
  return {
    commits: h.commits.length,
    models: h.state.models.length,
    async appendOne() {
      edit(h.state, h.r, opts.models ?? 150, 1);
      await appendCommits(dir, [{ date: h.at(n), message: 'one more change', files: { 'prisma/schema.prisma': render(h.state, h.formatting) } }]);
      n++;
    },
  };
}
