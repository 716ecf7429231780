// One measurement of the Prisma benchmark, run in its own process; prints one JSON line.
import { spawnSync, execFileSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join, dirname } from 'node:path';
import { createRequire } from 'node:module';
import { extractHistory, toDocument, serialiseDocument, tuneV8, GENERATOR } from '@schema-strata/core/extract';
import prisma, { modernise } from '@schema-strata/adapter-prisma';
import { readBlobs } from './git-blobs.js';
import { cpuMark, cpuMsSince } from './cpu.js';

const [mode, repo, cache] = process.argv.slice(2);
// every mode with the V8 settings the CLI runs with
tuneV8();
const require = createRequire(import.meta.url);
const wasm = require(require.resolve('@prisma/prisma-schema-wasm', { paths: [dirname(require.resolve('@schema-strata/adapter-prisma'))] }));
const parse = (path, text) => JSON.parse(wasm.get_datamodel(JSON.stringify({ prismaSchema: [[path, modernise(text).text]] })));
const SCHEMA = 'prisma/schema.prisma';

const t0 = process.hrtime.bigint();
const c0 = cpuMark();
let out = {};
if (mode === 'extract') {
  const h = await extractHistory({ repo, adapter: prisma, cacheDir: cache });
  writeFileSync(join(repo, '..', 'history.json'), serialiseDocument(toDocument(h, GENERATOR)));
  out = { versions: h.versions.length, parsed: h.stats.assembled, cacheHits: h.stats.assembleCacheHits };
} else if (mode === 'floor') {
  // every distinct blob of the schema file: one log pass to list them, one cat-file process to read them
  const log = execFileSync('git', ['-C', repo, 'log', '--first-parent', '--format=', '--raw', '--no-abbrev', 'HEAD', '--', SCHEMA], { encoding: 'utf8', maxBuffer: 1 << 28 });
  const blobs = [...new Set(log.split('\n').filter(Boolean).map((l) => l.split(' ')[3]).filter((b) => b && !/^0+$/.test(b)))];
  const texts = await readBlobs(repo, blobs);
  for (const t of texts) parse(SCHEMA, t);
  out = { parsed: texts.length };
} else if (mode === 'naive') {
  const commits = execFileSync('git', ['-C', repo, 'rev-list', '--first-parent', 'HEAD'], { encoding: 'utf8' }).split('\n').filter(Boolean);
  let parsed = 0;
  for (const c of commits) {
    const r = spawnSync('git', ['-C', repo, 'show', `${c}:${SCHEMA}`], { encoding: 'utf8', maxBuffer: 1 << 26 });
    if (r.status !== 0) continue;
    try {
      parse(SCHEMA, r.stdout);
    } catch {
      // a bad version: still parsed once
    }
    parsed++;
  }
  out = { parsed };
}
const ms = Number(process.hrtime.bigint() - t0) / 1e6;
out.ms = Math.round(ms);
out.cpuMs = Math.round(cpuMsSince(c0));
out.maxRssMB = Math.round(process.resourceUsage().maxRSS / 1024);
console.log(JSON.stringify(out));

