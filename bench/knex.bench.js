// Knex adapter benchmark: a synthetic history of about 1,500 commits, one new or edited migration
// each, extracted with the Knex adapter and set side by side, in one run, with
//   - the floor: one pass that lists every distinct migration blob (git log --raw), reads each
//     once (git cat-file --batch) and parses each once with the TypeScript parser;
//   - the naive way: parse and replay every migration anew at every commit (measured on a
//     sample of the commits and scaled to all of them);
//   - the extract cut at 500, 1,000 and 1,500 commits, to show the cost growing linearly.
// Every measurement runs in a fresh process (no warm caches carried from one to the next); the
// extract also reports the time spent in the adapter's own steps (locate, parseFile, the
// session's assemble), the rest being git and core. Peak memory is each process's max RSS.
// Targets (issue 5): extract <= 1.5x the floor, >= 20x faster than naive.
import { spawnSync } from 'node:child_process';
import { mkdirSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { extractHistory, tuneV8, writeRepository } from '@schema-strata/core';
import knex, { KnexSession, knexOptions, parseKnexSource } from '@schema-strata/adapter-knex';
import { readBlobs } from './lib/git-blobs.js';
import { rng } from './lib/rng.js';

const here = dirname(fileURLToPath(import.meta.url));
const require = createRequire(import.meta.url);
const { ts } = createRequire(require.resolve('@schema-strata/adapter-knex'))('ts-morph');

const COMMITS = Number(process.env.KNEX_BENCH_COMMITS ?? 1500);
const NAIVE_SAMPLE = Number(process.env.KNEX_BENCH_NAIVE_SAMPLE ?? 60);

// ------------------------------------------------------------------ a synthetic history


const NOUNS = ['tool', 'member', 'loan', 'repair', 'shelf', 'badge', 'event', 'donation', 'skill', 'visit', 'kit', 'part', 'note', 'slot', 'route'];

function renderMigration(m, variant) {
  const body = m.ops.map((op) => op(variant)).join('\n');
  if (m.ts) {
    return `import type { Knex } from 'knex';\n\n// ${m.comment}\nexport async function up(knex: Knex): Promise<void> {\n${body}\n}\n\nexport async function down(knex: Knex): Promise<void> {\n  await knex.schema.dropTableIfExists('${m.table}_unused');\n}\n`;
  }
  return `// ${m.comment}\nexports.up = async function (knex) {\n${body}\n};\n\nexports.down = async function (knex) {\n  await knex.schema.dropTableIfExists('${m.table}_unused');\n};\n`;
}

/** Commits of a synthetic Knex project: mostly new migrations, some edits of old ones. */
function generate(n) {
  const rnd = rng(20240501);
  const pick = (xs) => xs[Math.floor(rnd() * xs.length)];
  const tables = [];
  const migrations = [];
  const commits = [];
  const day = (i) => new Date(Date.UTC(2019, 0, 1) + i * 36e5 * 13).toISOString().replace('.000Z', '+00:00');
  for (let i = 0; i < n; i++) {
    const files = {};
    if (i === 0) {
      files['package.json'] = '{\n  "name": "synthetic-coop",\n  "private": true,\n  "dependencies": { "knex": "^3.1.0" }\n}\n';
      files['knexfile.js'] = "module.exports = {\n  client: 'pg',\n  migrations: { directory: './db/migrations' },\n};\n";
    }
    const r = rnd();
    const creators = migrations.slice(0, Math.max(0, migrations.length - 10)).filter((m) => m.creates);
    if (r < 0.05 && creators.length > 0) {
      // edit an old migration: a longer string column in the table it creates
      const m = pick(creators);
      m.variant++;
      files[m.path] = renderMigration(m, m.variant);
      commits.push({ date: day(i), message: `Edit ${m.path}`, files });
      continue;
    }
    const ts = rnd() < 0.4;
    const stamp = String(20190101000000 + i * 100).padStart(14, '0');
    let m;
    if (r < 0.3 || tables.length < 5) {
      const name = `${pick(NOUNS)}_${tables.length}`;
      const cols = [];
      const nc = 3 + Math.floor(rnd() * 6);
      for (let c = 0; c < nc; c++) cols.push(`c${c}`);
      const ref = tables.length > 0 && rnd() < 0.6 ? pick(tables) : null;
      const table = { name, cols: [...cols] };
      tables.push(table);
      m = {
        table: name,
        creates: true,
        comment: `Create ${name}`,
        ops: [
          (v) =>
            [
              `  await knex.schema.createTable('${name}', (t) => {`,
              "    t.increments('id');",
              ...cols.map((c, k) =>
                k % 3 === 0 ? `    t.string('${c}', ${40 + v}).notNullable();` : k % 3 === 1 ? `    t.integer('${c}').nullable();` : `    t.text('${c}');`,
              ),
              ...(ref ? [`    t.integer('${ref.name}_id').unsigned().references('id').inTable('${ref.name}').onDelete('CASCADE');`] : []),
              "    t.timestamps(true, true);",
              '  });',
            ].join('\n'),
        ],
      };
      if (ref) table.cols.push(`${ref.name}_id`);
    } else {
      const t = pick(tables);
      const kind = rnd();
      let op;
      if (kind < 0.5 || t.cols.length < 2) {
        const c = `x${i}`;
        t.cols.push(c);
        op = () => `  await knex.schema.alterTable('${t.name}', (t) => {\n    t.string('${c}', 60).nullable();\n  });`;
      } else if (kind < 0.7) {
        const c = pick(t.cols);
        op = () => `  await knex.schema.alterTable('${t.name}', (t) => {\n    t.text('${c}').alter();\n  });`;
      } else if (kind < 0.8) {
        const c = pick(t.cols);
        const to = `${c}_r${i}`;
        t.cols[t.cols.indexOf(c)] = to;
        op = () => `  await knex.schema.alterTable('${t.name}', (t) => {\n    t.renameColumn('${c}', '${to}');\n  });`;
      } else if (kind < 0.9) {
        const other = pick(tables);
        const c = `${other.name}_ref${i}`;
        t.cols.push(c);
        op = () => `  await knex.schema.alterTable('${t.name}', (t) => {\n    t.integer('${c}').unsigned().references('${other.name}.id');\n  });`;
      } else {
        const c = t.cols.splice(Math.floor(rnd() * t.cols.length), 1)[0];
        op = () => `  await knex.schema.alterTable('${t.name}', (t) => {\n    t.dropColumn('${c}');\n  });`;
      }
      m = { table: t.name, comment: `Change ${t.name}`, ops: [op] };
    }
    m.ts = ts;
    m.variant = 0;
    m.path = `db/migrations/${stamp}_${m.comment.toLowerCase().replace(/\W+/g, '_')}.${ts ? 'ts' : 'js'}`;
    migrations.push(m);
    files[m.path] = renderMigration(m, 0);
    commits.push({ date: day(i), message: m.comment, files });
  }
  return commits;
}

// ------------------------------------------------------------------ measurements

function time(fn) {
  const t0 = process.hrtime.bigint();
  const r = fn();
  if (r && typeof r.then === 'function') return r.then((v) => ({ ms: Number(process.hrtime.bigint() - t0) / 1e6, value: v }));
  return { ms: Number(process.hrtime.bigint() - t0) / 1e6, value: r };
}


/** The floor: list the distinct migration blobs, read each once, parse each once. */
async function floor(repo) {
  const log = spawnSync('git', ['-C', repo, 'log', '--raw', '--no-abbrev', '--format=', '--first-parent', '--reverse', 'main', '--', 'db/migrations'], {
    encoding: 'utf8',
    maxBuffer: 1 << 30,
  }).stdout;
  const ids = [...new Set(log.split('\n').filter((l) => l.startsWith(':')).map((l) => l.split(' ')[3]))];
  const texts = await readBlobs(repo, ids);
  let nodes = 0;
  for (const text of texts) nodes += ts.createSourceFile('m.ts', text, ts.ScriptTarget.Latest, false, ts.ScriptKind.TS).statements.length;
  return { blobs: ids.length, nodes };
}

/**
 * Work beyond the floor that every extract does, whatever its design, measured alone: the facts
 * of every distinct blob (the floor's pass with the adapter's parse in place of the bare
 * TypeScript parse), and one replay of every migration (a fold of the last commit's
 * migrations, their facts made before the clock starts).
 */
async function beyondFloor(repo, what) {
  // (the facts pass is timed as the floor is: from the log on)
  const t0 = process.hrtime.bigint();
  const log = spawnSync('git', ['-C', repo, 'log', '--raw', '--no-abbrev', '--format=', '--first-parent', '--reverse', 'main', '--', 'db/migrations'], {
    encoding: 'utf8',
    maxBuffer: 1 << 30,
  }).stdout;
  if (what === 'facts') {
    const ids = [...new Set(log.split('\n').filter((l) => l.startsWith(':')).map((l) => l.split(' ')[3]))];
    const texts = await readBlobs(repo, ids);
    for (const text of texts) parseKnexSource(text);
    return { ms: Number(process.hrtime.bigint() - t0) / 1e6 };
  }
  const paths = spawnSync('git', ['-C', repo, 'ls-tree', '-r', '--name-only', 'main', 'db/migrations'], { encoding: 'utf8' }).stdout.trim().split('\n');
  const blobs = spawnSync('git', ['-C', repo, 'rev-parse', ...paths.map((p) => `main:${p}`)], { encoding: 'utf8' }).stdout.trim().split('\n');
  const texts = await readBlobs(repo, blobs);
  const files = paths.map((path, i) => ({ path, blob: blobs[i], facts: parseKnexSource(texts[i]).facts }));
  const t1 = process.hrtime.bigint();
  const session = new KnexSession(knexOptions({}));
  session.assemble({ files, missing: [] });
  return { ms: Number(process.hrtime.bigint() - t1) / 1e6, migrations: session.replayed };
}

/** The naive way at one commit: parse every migration present and replay them all from scratch. */
function naiveAt(commits, upTo) {
  const tree = new Map();
  for (let i = 0; i <= upTo; i++) for (const [p, t] of Object.entries(commits[i].files)) if (t !== null) tree.set(p, t);
  const files = [...tree.keys()].sort().map((path) => {
    const r = parseKnexSource(tree.get(path));
    return { path, blob: path, facts: r.ok ? r.facts : undefined };
  });
  const session = new KnexSession(knexOptions({}));
  return session.assemble({ files: files.filter((f) => f.facts), missing: [] });
}

const mb = (n) => `${(n / 1024 / 1024).toFixed(0)} MiB`;

/** The Knex adapter with a clock around its own steps (locate, parseFile, the session's assemble). */
function timedAdapter() {
  const clock = { ms: 0 };
  // locate reads files (it awaits git): timed until it resolves; the engine awaits each call
  // before the next one
  const timedAsync = (fn) => async (...args) => {
    const t0 = process.hrtime.bigint();
    try {
      return await fn(...args);
    } finally {
      clock.ms += Number(process.hrtime.bigint() - t0) / 1e6;
    }
  };
  // parseFile and assemble are synchronous: timed until they return (awaiting them would count
  // whatever else runs before the await resumes, as the files parsed ahead of their version do)
  const timed = (fn) => (...args) => {
    const t0 = process.hrtime.bigint();
    try {
      return fn(...args);
    } finally {
      clock.ms += Number(process.hrtime.bigint() - t0) / 1e6;
    }
  };
  const adapter = {
    ...knex,
    locate: timedAsync(knex.locate),
    parseFile: timed(knex.parseFile),
    createSession: (o) => {
      const s = knex.createSession(o);
      return { assemble: timed((input) => s.assemble(input)) };
    },
  };
  return { adapter, clock };
}

/** One measurement, in this (fresh) process: prints one JSON line. */
async function child(mode, dir, arg) {
  // every measurement with the V8 settings the CLI runs with
  tuneV8();
  // load the TypeScript parser first in every mode, so that no measurement pays for loading it
  ts.createSourceFile('warm.ts', 'export {}', ts.ScriptTarget.Latest);
  let out;
  if (mode === 'floor') {
    const r = await time(() => floor(dir));
    out = { ms: r.ms, blobs: r.value.blobs };
  } else if (mode === 'extract') {
    const { adapter, clock } = timedAdapter();
    const r = await time(() => extractHistory({ repo: dir, adapter, ...(arg ? { until: arg } : {}) }));
    const h = r.value;
    const last = h.versions[h.versions.length - 1];
    out = {
      ms: r.ms, adapterMs: clock.ms, versions: h.versions.length, tables: h.snapshots.get(last.snapshot).tables.length,
      filesParsed: h.stats.filesParsed, assembled: h.stats.assembled,
    };
  } else if (mode === 'facts' || mode === 'fold') {
    out = await beyondFloor(dir, mode);
  } else if (mode === 'naive') {
    const commits = generate(COMMITS);
    const sample = JSON.parse(arg);
    let ms = 0;
    for (const i of sample) ms += time(() => naiveAt(commits, i)).ms;
    out = { ms };
  }
  out.maxRssBytes = process.resourceUsage().maxRSS * 1024;
  console.log(JSON.stringify(out));
}

function measure(mode, dir, arg = '') {
  const r = spawnSync(process.execPath, [fileURLToPath(import.meta.url), '--child', mode, dir, arg], { encoding: 'utf8', maxBuffer: 1 << 26 });
  if (r.status !== 0) throw new Error(`${mode} failed: ${r.stderr}`);
  return JSON.parse(r.stdout.trim().split('\n').pop());
}

async function main() {
  const dir = join(here, '..', '.bench', 'knex-history');
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  const commits = generate(COMMITS);
  await writeRepository(dir, commits, { checkout: false });
  const revs = spawnSync('git', ['-C', dir, 'rev-list', '--reverse', 'main'], { encoding: 'utf8' }).stdout.trim().split('\n');

  // each measurement in a fresh process; floor and extract interleaved, twice each, the faster
  // of each pair counts (the machine may be shared with other work)
  const floors = [];
  const extracts = [];
  // (the facts pass beside them: it is the floor's pass with more work, so they are best compared side by side)
  const factsRuns = [];
  for (let k = 0; k < 2; k++) {
    floors.push(measure('floor', dir));
    factsRuns.push(measure('facts', dir));
    extracts.push(measure('extract', dir));
  }
  const f = floors.reduce((a, b) => (b.ms < a.ms ? b : a));
  const x = extracts.reduce((a, b) => (b.ms < a.ms ? b : a));

  // work beyond the floor that any extract does (the faster of two runs each)
  const facts = factsRuns.reduce((a, b) => (b.ms < a.ms ? b : a));
  const fold = [measure('fold', dir), measure('fold', dir)].reduce((a, b) => (b.ms < a.ms ? b : a));

  // naive, on evenly spaced commits, scaled to all versions
  const sample = [];
  for (let k = 0; k < NAIVE_SAMPLE; k++) sample.push(Math.floor(((k + 0.5) * COMMITS) / NAIVE_SAMPLE));
  const n = measure('naive', dir, JSON.stringify(sample));
  const naiveAdapterMs = (n.ms / sample.length) * x.versions;
  // the naive pipeline does the same git and core work as the extract, plus its own adapter work
  const naiveMs = naiveAdapterMs + (x.ms - x.adapterMs);

  // linear growth: the extract cut at 500, 1,000, 1,500 commits
  const growth = [500, 1000, 1500].filter((c) => c <= COMMITS).map((c) => ({ commits: c, ...measure('extract', dir, revs[c - 1]) }));

  const pad = (v, w = 8) => String(v).padStart(w);
  console.log(`synthetic Knex history: ${COMMITS} commits, ${x.versions} versions, ${f.blobs} distinct migration blobs, ${x.tables} tables at the end`);
  console.log(`adapter work in the extract: ${x.filesParsed} files parsed (each distinct blob once), ${x.assembled} versions assembled`);
  console.log('');
  console.log('                                        time      ratio');
  console.log(`floor (list, read, parse once)      ${pad(f.ms.toFixed(0))} ms     1.00x`);
  console.log(`extract (knex adapter, whole run)   ${pad(x.ms.toFixed(0))} ms   ${pad((x.ms / f.ms).toFixed(2), 6)}x the floor  (target <= 1.5x)`);
  console.log(`  of which the adapter's own steps  ${pad(x.adapterMs.toFixed(0))} ms   ${pad((x.adapterMs / f.ms).toFixed(2), 6)}x the floor`);
  console.log(`  of which git and core             ${pad((x.ms - x.adapterMs).toFixed(0))} ms   ${pad(((x.ms - x.adapterMs) / f.ms).toFixed(2), 6)}x the floor`);
  console.log(`work beyond the floor that any extract does, each measured alone:`);
  console.log(`  the adapter's facts of every blob   ${pad(facts.ms.toFixed(0))} ms   ${pad((facts.ms / f.ms).toFixed(2), 6)}x the floor  (the floor's pass, the adapter's parse in place of TypeScript's)`);
  console.log(`  one replay of every migration       ${pad(fold.ms.toFixed(0))} ms   ${pad((fold.ms / f.ms).toFixed(2), 6)}x the floor  (a fold of the last commit's ${fold.migrations} migrations)`);
  console.log(`  so at least ${((Math.max(facts.ms, f.ms) + fold.ms) / f.ms).toFixed(2)}x the floor before any per-version work (the floor or the facts pass, whichever is longer, plus the fold)`);
  console.log(`naive (parse + replay every commit) ${pad(naiveMs.toFixed(0))} ms   ${pad((naiveMs / x.ms).toFixed(1), 6)}x the extract  (target >= 20x)`);
  console.log(`  of which the adapter's own steps  ${pad(naiveAdapterMs.toFixed(0))} ms   ${pad((naiveAdapterMs / x.adapterMs).toFixed(1), 6)}x the extract's adapter steps (sampled on ${sample.length} commits, scaled)`);
  console.log('');
  console.log('extract cut at N commits (migrations appended; linear growth means a flat ms per commit):');
  for (const g of growth) {
    console.log(`  ${pad(g.commits, 5)} commits  ${pad(g.ms.toFixed(0), 6)} ms  ${(g.ms / g.commits).toFixed(2)} ms/commit   adapter ${pad(g.adapterMs.toFixed(0), 6)} ms  ${(g.adapterMs / g.commits).toFixed(2)} ms/commit  (${g.versions} versions)`);
  }
  console.log('');
  console.log(`peak memory (max RSS): extract ${mb(x.maxRssBytes)}, floor ${mb(f.maxRssBytes)}, naive sample ${mb(n.maxRssBytes)}`);
  const ok = x.ms / f.ms <= 1.5 && naiveMs / x.ms >= 20;
  const larger = x.adapterMs >= x.ms - x.adapterMs ? "the adapter's own steps" : 'git and core';
  console.log(ok ? 'targets met' : `targets NOT met (see the split above: ${larger} take the larger part of the extract)`);
}

if (process.argv[2] === '--child') {
  child(process.argv[3], process.argv[4], process.argv[5]).catch((e) => {
    console.error(e);
    process.exitCode = 1;
  });
} else {
  main().catch((e) => {
    console.error(e);
    process.exitCode = 1;
  });
}
