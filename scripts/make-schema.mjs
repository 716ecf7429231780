// Writes packages/core/schema/history.schema.json. The schema is kept as this script so that
// shared parts ($defs) stay in one place; run `node scripts/make-schema.mjs` after editing.
import { writeFileSync } from 'node:fs';

const str = (description, extra = {}) => ({ type: 'string', description, ...extra });
const int = (description, extra = {}) => ({ type: 'integer', minimum: 0, description, ...extra });
const bool = (description) => ({ type: 'boolean', description });
const arr = (description, items, extra = {}) => ({ type: 'array', description, items, ...extra });
const obj = (description, properties, required = Object.keys(properties), extra = {}) => ({
  type: 'object', description, properties, required, additionalProperties: false, ...extra,
});
const ref = (name, description) => ({ $ref: `#/$defs/${name}`, ...(description ? { description } : {}) });
const hash = (description) => str(description, { pattern: '^[0-9a-f]{24}$' });
const sha = (description) => str(description, { pattern: '^[0-9a-f]{40}([0-9a-f]{24})?$' });
const isoTime = (description) => str(description, { format: 'date-time' });

const typeKinds = ['integer', 'smallint', 'bigint', 'decimal', 'float', 'double', 'boolean', 'string', 'text', 'uuid',
  'date', 'time', 'datetime', 'timestamp', 'json', 'binary', 'enum', 'array', 'other'];

const $defs = {
  origin: obj('Where a definition was found.', {
    file: str('Path of the file, relative to the repository root.'),
    line: int('Line number, starting at 1.', { minimum: 1 }),
  }, ['file']),
  neutralType: {
    type: 'object',
    description: 'The neutral type of a column. `kind` names it; the other fields qualify some kinds.',
    properties: {
      kind: str('The neutral type kind.', { enum: typeKinds }),
      length: int('Maximum length of a `string` or `binary`, when set.'),
      precision: int('Total digits of a `decimal`; fractional-second digits of a `time`, `datetime` or `timestamp`.'),
      scale: int('Digits after the decimal point of a `decimal`.'),
      withZone: bool('For `timestamp` and `time`: whether the value carries a time zone.'),
      name: str('For `enum`: the enum type name, when it has one.'),
      values: arr('For `enum`: its values, in declaration order.', { type: 'string' }),
      of: { $ref: '#/$defs/neutralType', description: 'For `array`: the element type.' },
      raw: str('For `other`: the type as written, which no neutral kind covers.'),
    },
    required: ['kind'],
    additionalProperties: false,
  },
  column: obj('A column of a table.', {
    name: str('Physical column name.'),
    id: str('Identity of the column across versions when the ORM code states a rename: its first name. Absent means `name`.'),
    ormName: str('Name of the field or property in the ORM code.'),
    type: ref('neutralType', 'Neutral type.'),
    nativeType: str('The type as written in the ORM code.'),
    nullable: bool('Whether the column accepts NULL.'),
    default: str('Default value or expression, as text.'),
    generated: str('How the database generates the value, when it does.', { enum: ['autoincrement', 'identity', 'uuid', 'computed', 'rowid'] }),
    origin: ref('origin', 'Where the column was declared, in the first version that had this exact table.'),
  }, ['name', 'type', 'nativeType', 'nullable']),
  foreignKey: obj('A foreign key from this table to a referenced table.', {
    name: str('Constraint name, when the ORM code names it.'),
    columns: arr('Referencing columns, in order.', { type: 'string' }, { minItems: 1 }),
    referencedTable: str('Stable id of the referenced table.'),
    referencedColumns: arr('Referenced columns, in order.', { type: 'string' }),
    onDelete: str('Referential action on delete.', { enum: ['cascade', 'restrict', 'no action', 'set null', 'set default'] }),
    onUpdate: str('Referential action on update.', { enum: ['cascade', 'restrict', 'no action', 'set null', 'set default'] }),
    enforcement: str('`database`: a real constraint; `orm`: emulated by the ORM, no constraint in the database.', { enum: ['database', 'orm'] }),
  }, ['columns', 'referencedTable', 'referencedColumns', 'enforcement']),
  unique: obj('A unique constraint.', {
    name: str('Constraint name, when the ORM code names it.'),
    columns: arr('Columns of the constraint, in order.', { type: 'string' }, { minItems: 1 }),
  }, ['columns']),
  table: obj('A table, stored once per distinct content (see `tables`).', {
    id: str('Stable id of the table across versions: its physical name, qualified by its namespace when it has one; kept through a rename that the ORM code states.'),
    name: str('Physical table name.'),
    namespace: str('Database schema (namespace); absent means the default one.'),
    ormName: str('Name of the model, entity or class in the ORM code.'),
    kind: str('`table`: declared in the ORM code; `implicit-join`: a join table the ORM creates without the code declaring it.', { enum: ['table', 'implicit-join'] }),
    columns: arr('Columns, in declaration order.', ref('column')),
    primaryKey: arr('Primary-key columns in key order; empty when there is none.', { type: 'string' }),
    foreignKeys: arr('Foreign keys, sorted by their columns.', ref('foreignKey')),
    uniques: arr('Unique constraints (single- and multi-column), sorted by their columns.', ref('unique')),
    origin: ref('origin', 'Where the table was declared, in the first version that had this exact table.'),
  }, ['id', 'name', 'kind', 'columns', 'primaryKey', 'foreignKeys', 'uniques']),
  view: obj('A view: reported, not a table of the analysis.', {
    id: str('Stable id of the view.'),
    name: str('Physical view name.'),
    namespace: str('Database schema (namespace), when set.'),
    ormName: str('Name in the ORM code.'),
  }, ['id', 'name']),
  diagnostic: obj('Something the run could not read or had to guess.', {
    severity: str('How serious it is.', { enum: ['error', 'warning', 'info'] }),
    code: str('Stable code, such as `prisma/parse-error` or `file/too-large`.'),
    message: str('What happened, in plain words.'),
    file: str('File concerned, relative to the repository root.'),
    line: int('Line concerned, starting at 1.', { minimum: 1 }),
    column: int('Column concerned, starting at 1.', { minimum: 1 }),
  }, ['severity', 'code', 'message']),
  fileRef: obj('A file of a version.', {
    path: str('Path relative to the repository root.'),
    blob: sha('Git blob id of its content.'),
  }),
  version: obj('One version: a first-parent commit at which the files the schema was built from changed.', {
    index: int('Position in `versions`, from 0.'),
    commit: sha('Commit id.'),
    parent: { type: ['string', 'null'], description: 'First parent commit id; null for a root commit.' },
    authorTime: isoTime('Author date, ISO 8601 with the author\'s offset.'),
    committerTime: isoTime('Committer date, ISO 8601 with the committer\'s offset; the time axis of every measure.'),
    subject: str('First line of the commit message.'),
    files: arr('Files the schema was built from, sorted by path.', ref('fileRef')),
    consulted: arr('Files read only to locate the schema (package.json, ORM configs).', ref('fileRef')),
    status: str('`ok`; `no change` (inputs changed, schema did not); `partial` (some files failed to parse and kept their last good parse); `carried` (the schema failed to build: the previous snapshot is kept); `absent` (no schema in the tree).', { enum: ['ok', 'no change', 'partial', 'carried', 'absent'] }),
    snapshot: { oneOf: [hash('Storage hash of the snapshot (key of `snapshots`).'), { type: 'null' }], description: 'Storage hash of the snapshot (key of `snapshots`); null when `absent`.' },
    diagnostics: arr('Diagnostics of this version.', ref('diagnostic')),
    counters: { type: 'object', description: 'Counts the adapter reports for this version, such as raw SQL statements left out.', additionalProperties: { type: 'integer', minimum: 0 } },
  }),
  snapshot: obj('The schema of one or more versions.', {
    meaningHash: hash('Hash of the schema\'s meaning: column order and origins left out. Equal meaning hashes mean no change.'),
    tables: arr('Storage hashes of its tables (keys of `tables`), in canonical order (by table id).', hash('Storage hash of a table.')),
    views: arr('Views (reported, not analysed).', ref('view')),
  }),
  change: obj('One change between two consecutive versions.', {
    version: int('Index of the version at which the change is seen.'),
    kind: str('Change kind.', { enum: ['table-added', 'table-removed', 'table-renamed', 'column-added', 'column-removed', 'column-renamed',
      'column-type-changed', 'column-nullability-changed', 'column-default-changed', 'column-unique-changed',
      'column-enum-values-changed', 'primary-key-changed', 'foreign-key-added', 'foreign-key-removed', 'foreign-key-changed'] }),
    table: str('Stable id of the table.'),
    column: str('Physical column name, for column changes.'),
    foreignKey: str('Referencing columns, comma-separated, for foreign-key changes.'),
    before: str('Text form of the value before the change; absent for additions.'),
    after: str('Text form of the value after the change; absent for removals.'),
    basis: str('For renames: `stated` by the ORM code, or found by the `heuristic`.', { enum: ['stated', 'heuristic'] }),
    evidence: str('For heuristic renames: what the match rests on.'),
  }, ['version', 'kind', 'table']),
};

const schema = {
  $schema: 'https://json-schema.org/draft/2020-12/schema',
  $id: 'urn:schema-strata:history:1',
  title: 'schema-strata history',
  description: 'The schema history of one repository as rebuilt by schema-strata from ORM code: versions, snapshots, tables, changes and, when analysed, measures and statistics.',
  type: 'object',
  properties: {
    format: str('Name of this format.', { const: 'schema-strata-history' }),
    formatVersion: str('Version of this format (semantic versioning).', { pattern: '^1\\.\\d+\\.\\d+$' }),
    generator: obj('The program that wrote the file.', { name: str('Program name.'), version: str('Program version.') }),
    source: obj('What was analysed, and how.', {
      repository: str('The repository as the user named it (path or URL).'),
      ref: str('The ref analysed, as given.'),
      head: sha('The commit the ref resolved to.'),
      adapter: obj('The adapter that read the ORM code.', {
        name: str('Adapter name.'), version: str('Adapter version.'), source: str('Package name or file it was loaded from.'),
      }, ['name', 'version']),
      paths: arr('The `--path` entries given, if any.', { type: 'string' }),
      options: { type: 'object', description: 'Adapter options that change its output, as given.' },
      window: obj('The `--since` / `--until` window, as given.', { since: str('Start of the window.'), until: str('End of the window.') }, []),
    }),
    summary: obj('Counts over the whole file, for a quick look.', {
      versions: int('Number of versions.'),
      firstCommit: sha('Commit of version 0.'),
      lastCommit: sha('Commit of the last version.'),
      firstDate: isoTime('Committer date of version 0.'),
      lastDate: isoTime('Committer date of the last version.'),
      distinctSnapshots: int('Number of distinct snapshots.'),
      distinctTables: int('Number of distinct stored tables (table contents).'),
      tableIds: int('Number of distinct table ids that ever existed.'),
      changes: int('Number of changes.'),
      statuses: { type: 'object', description: 'Number of versions by status.', additionalProperties: { type: 'integer', minimum: 0 } },
    }),
    versions: arr('Versions, oldest first.', ref('version'), { minItems: 1 }),
    snapshots: { type: 'object', description: 'Distinct snapshots, keyed by storage hash.', additionalProperties: ref('snapshot') },
    tables: { type: 'object', description: 'Distinct table contents, keyed by storage hash (canonical JSON with columns in declaration order, origins left out).', additionalProperties: ref('table') },
    changes: arr('Changes between consecutive versions, by version, table and kind. Version 0 lists its tables as `table-added`.', ref('change')),
    diagnostics: arr('Diagnostics not tied to one version (commits before version 0 that failed to build, say).', ref('diagnostic')),
    analysis: { type: 'object', description: 'Measures and statistics, when the file was analysed (`extract --analyze`).' },
  },
  required: ['format', 'formatVersion', 'generator', 'source', 'summary', 'versions', 'snapshots', 'tables', 'changes', 'diagnostics'],
  additionalProperties: false,
  $defs,
};

writeFileSync(new URL('../packages/core/schema/history.schema.json', import.meta.url), JSON.stringify(schema, null, 2) + '\n');
