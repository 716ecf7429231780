// The fold across versions against a fresh fold, on seeded random histories: migrations are
// appended, edited, removed and inserted in the middle, and after every version the session's
// result (which replays only what it must and takes the rest over from its previous fold) is the
// one a new session gives for the same files. A version that only appends migrations extends
// the last plan instead of planning anew; that too must give the fresh result.
import { describe, expect, it } from 'vitest';
import { KnexSession, knexOptions, parseKnexSource, type KnexFacts } from '@schema-strata/adapter-knex';
import { rng } from '../../bench/lib/rng.js';

const TABLES = ['tools', 'members', 'loans', 'repairs'];

/** The body of one random migration (its variant changes a detail, as an edit would). */
function body(rnd: () => number): (variant: number) => string {
  const pick = <T>(xs: readonly T[]): T => xs[Math.floor(rnd() * xs.length)]!;
  const t = pick(TABLES);
  const other = pick(TABLES);
  const col = pick(['label', 'note', 'size', 'kind', 'due']);
  const r = rnd();
  if (r < 0.3) {
    const ref = rnd() < 0.5;
    return (v) =>
      `await knex.schema.createTable('${t}', (t) => { t.increments('id'); t.string('${col}', ${20 + v}); t.text('extra')${v % 2 ? '.notNullable()' : ''};` +
      (ref ? ` t.integer('${other}_id').references('id').inTable('${other}').onDelete('CASCADE');` : '') +
      (rnd() < 0.3 ? ` t.enu('state', ['a', 'b'], { useNative: true, enumName: 'state_kind' });` : '') +
      ' });';
  }
  if (r < 0.5) return (v) => `await knex.schema.alterTable('${t}', (t) => { t.string('${col}_${v}').nullable(); });`;
  // renaming a referenced key makes the foreign keys of other tables follow it
  const renamed = rnd() < 0.4 ? 'id' : col;
  if (r < 0.6) return (v) => `await knex.schema.alterTable('${t}', (t) => { t.renameColumn('${renamed}', '${renamed}_r${v}'); });`;
  if (r < 0.7) return () => `await knex.schema.alterTable('${t}', (t) => { t.dropColumn('${col}'); });`;
  if (r < 0.78) return (v) => `await knex.schema.renameTable('${t}', '${v % 2 ? other : t + '_old'}');`;
  if (r < 0.85) return () => `await knex.schema.dropTableIfExists('${t}');`;
  if (r < 0.92) return (v) => `if (await knex.schema.hasTable('${t}')) { await knex.schema.alterTable('${other}', (t) => { t.boolean('has_${t}_${v}'); }); }`;
  if (r < 0.96) return (v) => `await knex.schema.createViewOrReplace('${t}_view_${v % 2}', (view) => { view.as(knex('${t}').select('id')); });`;
  // raw SQL is not interpreted, but the tables it creates are named by later diagnostics
  return (v) => `await knex.raw('CREATE TABLE ${v % 2 ? t : other} (id integer)');`;
}

interface Slot {
  name: string;
  make: (variant: number) => string;
  variant: number;
}

type Input = { path: string; blob: string; facts: KnexFacts };

function parsed(text: string): KnexFacts {
  const r = parseKnexSource(text);
  if (!r.ok) throw new Error(`fixture does not parse: ${text}`);
  return r.facts;
}

// one input object per (file, variant), as core hands the same object while a path keeps its blob
const inputs = new Map<string, Input>();
function file(s: Slot): Input {
  const blob = `${s.name}:${s.variant}`;
  let f = inputs.get(blob);
  if (!f) {
    f = { path: `db/migrations/${s.name}.js`, blob, facts: parsed(`exports.up = async (knex) => { ${s.make(s.variant)} };\nexports.down = async () => {};\n`) };
    inputs.set(blob, f);
  }
  return f;
}

const KNEXFILE: Input = {
  path: 'knexfile.js',
  blob: 'knexfile',
  facts: parsed("module.exports = { client: 'pg', migrations: { directory: './db/migrations' } };\n"),
};

describe('the fold across versions, on random histories', () => {
  for (const seed of Array.from({ length: 12 }, (_, i) => i + 1)) {
    it(`gives the fresh fold's result at every version (seed ${seed})`, () => {
      const rnd = rng(seed);
      const slots: Slot[] = [];
      let stamp = 100;
      const session = new KnexSession(knexOptions({}));
      for (let round = 0; round < 60; round++) {
        const r = rnd();
        if (r < 0.55 || slots.length < 3) {
          slots.push({ name: `${stamp++}_m`, make: body(rnd), variant: 0 });
        } else if (r < 0.8) {
          slots[Math.floor(rnd() * slots.length)]!.variant++;
        } else if (r < 0.9) {
          slots.splice(Math.floor(rnd() * slots.length), 1);
        } else {
          // a migration with an earlier name, as a merged branch brings
          const at = Math.floor(rnd() * slots.length);
          slots.splice(at, 0, { name: `${slots[at]!.name}a${round}`, make: body(rnd), variant: 0 });
        }
        const files = [KNEXFILE, ...slots.map(file)].sort((a, b) => (a.path < b.path ? -1 : 1));
        const got = session.assemble({ files, missing: [] });
        const want = new KnexSession(knexOptions({})).assemble({ files, missing: [] });
        expect(got, `seed ${seed}, round ${round}`).toEqual(want);
      }
      // the test means something only if takeovers and extended plans happened
      expect(session.carriedOver).toBeGreaterThan(0);
      expect(session.plansExtended).toBeGreaterThan(0);
    });
  }
});
