// Small sources of the tool-lending scenario for tests that build long synthetic histories.
import type { ScriptedCommit } from '@schema-strata/core';

/** A Knex migration that creates `table` (id, label and `extra` columns). */
export const knexMigration = (table: string, extra = ''): string =>
  `exports.up = async (knex) => { await knex.schema.createTable('${table}', (t) => { t.increments('id'); t.string('label', 40);${extra} }); };\nexports.down = async () => {};\n`;

/** A TypeORM entity class `cls` (id, label and `extra` members). */
export const typeormEntity = (cls: string, extra = ''): string =>
  `import { Entity, PrimaryGeneratedColumn, Column } from 'typeorm';\n\n@Entity()\nexport class ${cls} {\n  @PrimaryGeneratedColumn()\n  id!: number;\n\n  @Column()\n  label!: string;\n${extra}}\n`;

/** The first commit of a Knex project: package.json, a knexfile and the tools migration. */
export const knexStart = (): ScriptedCommit['files'] => ({
  'package.json': '{ "dependencies": { "knex": "^3.1.0" } }\n',
  'knexfile.js': "module.exports = { client: 'pg', migrations: { directory: './db/migrations' } };\n",
  'db/migrations/000_tools.js': knexMigration('tools'),
});

/**
 * A Knex history of `count` steps after `knexStart()`: each step appends the migration
 * `NNN_<table><i>.js`, every 17th edits the tools migration, every 23rd deletes the migration of
 * five steps before; `step` may change each step's files.
 */
export function knexSteps(count: number, table: string, step: (i: number, files: ScriptedCommit['files']) => void = () => undefined): ScriptedCommit['files'][] {
  const name = (i: number): string => `db/migrations/${String(i).padStart(3, '0')}_${table}${i}.js`;
  const files: ScriptedCommit['files'][] = [knexStart()];
  for (let i = 1; i <= count; i++) {
    const s: ScriptedCommit['files'] = { [name(i)]: knexMigration(`${table}${i}`) };
    if (i % 17 === 0) s['db/migrations/000_tools.js'] = knexMigration('tools', ` t.integer('n${i}');`);
    if (i % 23 === 0) s[name(i - 5)] = null;
    step(i, s);
    files.push(s);
  }
  return files;
}

/**
 * A TypeORM history of 80 steps after a first commit: Tool and Member edited in turns, a service
 * file that is no entity changed every third step, Loan added at 40 and removed at 70; `step`
 * may change each step's files.
 */
export function typeormSteps(step: (i: number, files: ScriptedCommit['files']) => void = () => undefined): ScriptedCommit['files'][] {
  const files: ScriptedCommit['files'][] = [
    { 'package.json': '{ "dependencies": { "typeorm": "^0.3.20" } }\n', 'src/entity/Tool.ts': typeormEntity('Tool'), 'src/entity/Member.ts': typeormEntity('Member') },
  ];
  for (let i = 1; i <= 80; i++) {
    const s: ScriptedCommit['files'] = {};
    if (i % 3 === 0) s['src/entity/Tool.ts'] = typeormEntity('Tool', `\n  @Column({ nullable: true })\n  note${i}?: string;\n`);
    else if (i % 3 === 1) s['src/service.ts'] = `export const version = ${i};\n`;
    else s['src/entity/Member.ts'] = typeormEntity('Member', `\n  @Column()\n  n${i}!: number;\n`);
    if (i === 40) s['src/entity/Loan.ts'] = typeormEntity('Loan');
    if (i === 70) s['src/entity/Loan.ts'] = null;
    step(i, s);
    files.push(s);
  }
  return files;
}
