// Writes packages/core/schema/history.schema.json. The schema is kept as this script so that
// shared parts ($defs) stay in one place; run `node scripts/make-schema.mjs` after editing.
import { existsSync, writeFileSync } from 'node:fs';

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
    files: arr('Files added or changed at this version, among those the schema was built from, sorted by path (at version 0: all of them). The whole set of a version is the fold of `files` and `removedFiles` over the versions up to it.', ref('fileRef')),
    removedFiles: arr('Paths read at the previous version and no longer read at this one.', { type: 'string' }),
    fileCount: int('Number of files the schema of this version was built from.'),
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


// ---- the analysis (`extract --analyze`; `analyze --json` prints the same object)
const num = (description, extra = {}) => ({ type: 'number', description, ...extra });
const nullable = (schema) => ({ ...schema, type: [schema.type, 'null'] });
const changeKinds = $defs.change.properties.kind.enum;
const classes = ['isolated', 'source', 'sink', 'intermediate'];
const bands = ['unchanged', 'low', 'high'];
const groups = ['initial', 'later'];
const kindCounts = (description) => obj(description, Object.fromEntries(changeKinds.map((k) => [k, int(`Changes of kind \`${k}\`.`)])));
const classCounts = (description) => obj(description, Object.fromEntries(classes.map((c) => [c, int(`Tables of class \`${c}\`.`)])));
const range = { type: 'array', description: 'A run of versions, both ends included: [first, last].', items: { type: 'integer', minimum: 0 }, minItems: 2, maxItems: 2 };
const ranges = (description) => arr(description, range);
const notComputable = { computable: bool('Whether the value could be computed; when false, `reason` says why.'), reason: str('Why it could not be computed, in plain words.') };
const versionRef = (description) => obj(description, {
  version: int('Index of the version.'), commit: sha('Its commit.'), date: isoTime('Its committer date.'),
});
const matrix = (description, items) => arr(description, arr('One row.', items));

Object.assign($defs, {
  analysisOptions: obj('The options the analysis ran with (defaults filled in).', {
    count: arr('Change kinds counted as updates. The default (column added, column removed, column type changed, primary key changed) is a convention remembered from earlier schema-evolution studies, not a standard.', str('A change kind.', { enum: changeKinds })),
    highAbove: num('The threshold T: more than T counted updates (or rate, see bandBy) is `high`, 1 to T `low`. The default 5 is a remembered convention, not a standard.', { minimum: 0 }),
    bandBy: str('What the activity band compares with T: the `total` of counted updates, or their rate `per-year` or `per-version` of life.', { enum: ['total', 'per-year', 'per-version'] }),
    initial: {
      type: 'object', description: 'Which tables count as `initial`: `version0` (present in version 0), `versions` (born in the first `count` versions), `date` (born at or before `date`), `commit` (born at or before the version of `commit`).',
      properties: {
        kind: str('The rule.', { enum: ['version0', 'versions', 'date', 'commit'] }),
        count: int('For `versions`: how many first versions.', { minimum: 1 }),
        date: str('For `date`: the date as given.'),
        commit: sha('For `commit`: the commit the revision resolved to.'),
        label: str('For `commit`: the revision as given.'),
        version: { type: 'integer', minimum: -1, description: 'For `commit`: the last version at or before it (-1: none).' },
      },
      required: ['kind'], additionalProperties: false,
    },
    exclude: arr('Glob patterns of tables left out of the measures (matched against the id and every physical name).', { type: 'string' }),
    excludeImplicitJoins: bool('Whether join tables an ORM creates implicitly were left out.'),
    excludeOrmForeignKeys: bool('Whether foreign keys only the ORM enforces were left out of the graphs.'),
    alpha: num('Significance level of the plain-words readings.', { exclusiveMinimum: 0, exclusiveMaximum: 1 }),
    exact: obj('Settings of the exact test.', {
      limit: int('Tables with the observed margins are enumerated when there are at most this many; Monte Carlo above.'),
      draws: int('Monte Carlo draws.', { minimum: 1 }),
      seed: int('Seed of the Monte Carlo generator (32-bit Mersenne Twister).'),
    }),
    renames: str('`heuristic` when the changes hold renames found by the heuristic, else `stated`.', { enum: ['stated', 'heuristic'] }),
    initialCutoff: { type: 'integer', minimum: -1, description: 'Tables first born at or before this version index are `initial` (-1: none).' },
  }),
  neighbour: obj('A neighbour in the history graph.', {
    table: str('Stable id of the other table.'),
    foreignKeys: int('Foreign keys that ever existed between the two, in this direction (parallel ones counted here, once in the degrees).', { minimum: 1 }),
  }),
  classRun: obj('Consecutive versions of a table\'s life in one topology class.', {
    from: int('First version of the run.'), to: int('Last version of the run (included).'), class: str('Topology class in those versions.', { enum: classes }),
  }),
  tableMeasures: obj('Every measure of one table that ever existed.', {
    id: str('Stable id of the table.'),
    name: str('Physical name at the last version that had the table.'),
    namespace: str('Database schema (namespace) at that version; absent for the default one.'),
    ormName: str('Name of the model, entity or class in the ORM code at that version.'),
    kind: str('`table`, or `implicit-join` for a join table an ORM creates implicitly.', { enum: ['table', 'implicit-join'] }),
    formerNames: arr('Other physical names the table had (after renames).', { type: 'string' }),
    included: bool('Whether the table is in the measures and statistics.'),
    excludedBecause: str('Which filter left the table out.'),
    birth: versionRef('The version the table first appeared in.'),
    removal: { oneOf: [versionRef('The version at which the table was last removed.'), { type: 'null' }], description: 'The version at which the table was last removed; null while it lives at the last version.' },
    spells: arr('Spells of life: from a birth to the removal after it.', obj('One spell.', {
      born: int('Version of the (re)birth.'),
      removed: { type: ['integer', 'null'], minimum: 0, description: 'Version at which the table is gone (excluded from the spell); null while it lives.' },
    })),
    birthGroup: str('`initial` or `later` (see options.initial).', { enum: groups }),
    lifetime: obj('Lifetime, summed over the spells.', {
      versions: int('Versions the table lived in.'),
      days: num('Days by committer date, from each birth version to the removal version, or to the last version.', { minimum: 0 }),
    }),
    columns: obj('Number of columns.', { atBirth: int('At the first birth.'), atEnd: int('At the last version that had the table.') }),
    changes: kindCounts('Changes to the table, by kind (every kind listed).'),
    countedUpdates: int('Changes of the counted kinds.'),
    updatesPerVersion: num('Counted updates per version of life.', { minimum: 0 }),
    updatesPerYear: nullable(num('Counted updates per year (365.25 days) of life; null below 30 days of life.', { minimum: 0 })),
    activityBand: { type: ['string', 'null'], enum: [...bands, null], description: '`unchanged` (0 counted updates), `low` (1 to T), `high` (more than T); null when the rate it is based on cannot be computed.' },
    graph: {
      oneOf: [
        obj('Measures in the history graph.', {
          inDegree: int('Distinct other tables that ever referenced this one.'),
          outDegree: int('Distinct other tables this one ever referenced.'),
          degree: int('inDegree + outDegree: distinct neighbours (the variable of Spearman\'s correlation).'),
          selfReferences: int('Foreign keys of the table to itself that ever existed (reported, not counted in the degrees).'),
          references: arr('Tables this one referenced.', ref('neighbour')),
          referencedBy: arr('Tables that referenced this one.', ref('neighbour')),
          class: str('Topology class in the history graph: isolated (in 0, out 0), source (out > 0, in 0), sink (in > 0, out 0), intermediate (both > 0).', { enum: classes }),
          classes: arr('Class in every version of its life (per-version graphs), as runs.', ref('classRun')),
          classChanges: int('Changes of class between consecutive versions of one spell.'),
        }),
        { type: 'null' },
      ],
      description: 'Measures in the history graph; null for a table left out of the measures.',
    },
  }, ['id', 'name', 'kind', 'included', 'birth', 'removal', 'spells', 'birthGroup', 'lifetime', 'columns', 'changes', 'countedUpdates', 'updatesPerVersion', 'updatesPerYear', 'activityBand', 'graph']),
  versionPoint: obj('One version of the growth curve.', {
    index: int('Index of the version.'), commit: sha('Its commit.'), date: isoTime('Its committer date.'),
    status: $defs.version.properties.status,
    tables: int('Tables in the measures (an absent version keeps the last schema).'),
    columns: int('Columns of those tables.'),
    foreignKeys: int('Their foreign keys (ORM-only ones left out under excludeOrmForeignKeys, and those to excluded tables).'),
    changes: kindCounts('Changes seen at this version, by kind.'),
    countedUpdates: int('Counted updates seen at this version.'),
    classes: classCounts('Tables of each topology class in this version\'s foreign-key graph.'),
  }),
  chiSquare: obj('Pearson\'s chi-square test of independence, without continuity correction.', {
    ...notComputable,
    statistic: num('X^2.', { minimum: 0 }), df: int('Degrees of freedom, (r-1)(c-1) of the tested table.'), pValue: num('Upper-tail p-value.', { minimum: 0, maximum: 1 }),
    smallExpected: int('Cells with an expected count below 5 (the approximation is doubtful when over a fifth are: common practice).'),
    cells: int('Cells of the tested table.'),
  }, ['computable']),
  exactTest: obj('The exact test of Fisher, extended to r x c tables by Freeman and Halton.', {
    ...notComputable,
    method: str('`exact`: every table with the observed margins enumerated; `monte-carlo`: random tables drawn.', { enum: ['exact', 'monte-carlo'] }),
    alternative: str('Alternative hypothesis; two-sided sums the tables no more probable than the observed one (relative tolerance 1e-7).', { enum: ['two-sided', 'greater', 'less'] }),
    pValue: num('p-value; Monte Carlo: (1 + hits) / (draws + 1).', { minimum: 0, maximum: 1 }),
    tables: int('Exact: tables enumerated.'), draws: int('Monte Carlo: draws.'), seed: int('Monte Carlo: seed.'), hits: int('Monte Carlo: draws no more probable than the observed table.'),
    limit: int('The enumeration limit in force.'),
  }, ['computable']),
  cramersV: obj('Cramer\'s V.', {
    ...notComputable,
    value: num('sqrt(X^2 / (n (min(r, c) - 1))), uncorrected.', { minimum: 0 }),
    biasCorrected: obj('Bergsma\'s bias-corrected V.', { ...notComputable, value: num('The corrected value.', { minimum: 0 }) }, ['computable']),
  }, ['computable']),
  contingency: obj('A contingency table of two variables over the tables, with its tests.', {
    table: obj('Counts with margins, percentages and expected counts.', {
      rowVariable: str('Variable of the rows.'), columnVariable: str('Variable of the columns.'),
      rows: arr('Row labels.', { type: 'string' }), columns: arr('Column labels.', { type: 'string' }),
      counts: matrix('Counts, rows by columns.', { type: 'integer', minimum: 0 }),
      rowTotals: arr('Row totals.', { type: 'integer', minimum: 0 }), columnTotals: arr('Column totals.', { type: 'integer', minimum: 0 }), total: int('Grand total.'),
      rowPercent: matrix('Percent of the row total (null where it is 0).', { type: ['number', 'null'] }),
      columnPercent: matrix('Percent of the column total (null where it is 0).', { type: ['number', 'null'] }),
      totalPercent: matrix('Percent of the grand total (null when it is 0).', { type: ['number', 'null'] }),
      expected: matrix('Expected counts under independence.', { type: 'number', minimum: 0 }),
      droppedRows: arr('All-zero rows, left out of the tests.', { type: 'string' }),
      droppedColumns: arr('All-zero columns, left out of the tests.', { type: 'string' }),
    }),
    leftOut: arr('Tables of the analysis not in this table, with the reason.', obj('One table left out.', { table: str('Its id.'), reason: str('Why.') })),
    chiSquare: ref('chiSquare', 'Chi-square test of independence.'), exact: ref('exactTest', 'Exact test.'), cramersV: ref('cramersV', 'Strength of the association.'),
    reading: arr('Each result in one plain sentence.', { type: 'string' }),
  }),
  analysis: obj('Measures and statistics of the history (see docs/measures.md).', {
    options: ref('analysisOptions', 'The options the analysis ran with.'),
    summary: obj('Counts over the analysis.', {
      versions: int('Versions.'), tables: int('Tables that ever existed.'), included: int('Of them, in the measures.'), excluded: int('Of them, left out by a filter.'),
      changes: int('Changes to tables in the measures.'), countedUpdates: int('Counted updates of tables in the measures.'),
      classes: classCounts('Tables in the measures by history-graph class.'),
      birthGroups: obj('Tables in the measures by birth group.', Object.fromEntries(groups.map((g) => [g, int(`Tables \`${g}\`.`)]))),
      activityBands: obj('Tables in the measures by activity band.', Object.fromEntries(bands.map((b) => [b, int(`Tables \`${b}\`.`)]))),
    }),
    tables: arr('Every table that ever existed, by id.', ref('tableMeasures')),
    graph: obj('The history graph: every table that ever existed (in the measures) and every foreign key that ever existed.', {
      nodes: int('Nodes (tables in the measures).'),
      edges: arr('Edges, one per foreign key identity (table, ordered columns) and target.', obj('A foreign key of the history graph.', {
        key: str('Identity: `source -> target (column keys)`.'), source: str('Referencing table.'), target: str('Referenced table.'),
        columns: arr('Referencing columns (at the last version that had the key).', { type: 'string' }),
        referencedColumns: arr('Referenced columns.', { type: 'string' }),
        versions: ranges('Versions in which it existed.'),
        enforcement: arr('Enforcements it had.', str('`database` or `orm`.', { enum: ['database', 'orm'] })),
      })),
      dangling: arr('Foreign keys to a table that never existed in any snapshot: reported, kept out of the degrees.', obj('A dangling foreign key.', {
        table: str('Referencing table.'), columns: arr('Referencing columns.', { type: 'string' }), referencedTable: str('The id it names.'), versions: ranges('Versions in which it existed.'),
      })),
    }),
    versions: arr('The per-version series (growth curve).', ref('versionPoint')),
    renames: arr('Renames found by the heuristic, as the changes record them.', obj('One rename.', {
      version: int('Version.'), kind: str('What was renamed.', { enum: ['table', 'column'] }), table: str('Stable id of the table.'),
      from: str('Old name.'), to: str('New name.'), evidence: str('What the match rests on.'),
    })),
    statistics: obj('Tests of association between topology and evolution, over the tables in the measures, each classified on the history graph.', {
      units: int('Tables the statistics are computed on.'),
      alpha: num('Significance level of the readings.'),
      classByBirthGroup: ref('contingency', 'Topology class by birth group.'),
      classByActivityBand: ref('contingency', 'Topology class by activity band.'),
      degreeVersusUpdates: obj('Spearman\'s rank correlation of distinct neighbours (in + out) with counted updates.', {
        ...notComputable,
        n: int('Pairs.'), rho: num('Spearman\'s rho.', { minimum: -1, maximum: 1 }), S: num('S = (n^3 - n)(1 - rho) / 6.'),
        pValue: num('Two-sided p-value.', { minimum: 0, maximum: 1 }),
        method: str('`exact` (n <= 9, no ties) or `t-approximation`.', { enum: ['exact', 't-approximation'] }),
        ties: bool('Whether either variable has ties.'),
        reading: str('The result in one plain sentence.'),
      }, ['computable', 'reading']),
      updatesByClass: obj('Kruskal-Wallis test of counted updates across topology classes, with the tie correction.', {
        ...notComputable,
        statistic: num('H.'), df: int('Degrees of freedom (classes with tables - 1).'), pValue: num('Upper-tail p-value.', { minimum: 0, maximum: 1 }),
        n: int('Tables.'),
        groups: arr('Classes with tables.', obj('One class.', { label: str('Class.'), n: int('Tables.'), meanRank: num('Mean rank of their counted updates.') })),
        droppedGroups: arr('Classes without tables, left out.', { type: 'string' }),
        reading: str('The result in one plain sentence.'),
      }, ['computable', 'reading']),
      caution: str('Association is not causation.'),
    }),
  }),
});

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
    analysis: ref('analysis', 'Measures and statistics, when the file was analysed (`extract --analyze`).'),
  },
  required: ['format', 'formatVersion', 'generator', 'source', 'summary', 'versions', 'snapshots', 'tables', 'changes', 'diagnostics'],
  additionalProperties: false,
  $defs,
};

writeFileSync(new URL('../packages/core/schema/history.schema.json', import.meta.url), JSON.stringify(schema, null, 2) + '\n');

// The columns of the CSV files, for the codebook, from the CSV writers themselves (build core first).
const csvModule = new URL('../packages/core/dist/writers/csv/index.js', import.meta.url);
if (existsSync(csvModule)) {
  const { csvFieldsDocument } = await import(csvModule.href);
  writeFileSync(new URL('../packages/core/schema/csv-fields.json', import.meta.url), JSON.stringify(csvFieldsDocument(), null, 2) + '\n');
} else {
  console.error('packages/core/dist is missing: run `npx tsc -b packages/core` first to write packages/core/schema/csv-fields.json');
  process.exitCode = 1;
}
// The attributes of the graph exports (GEXF, GraphML, DOT), for the codebook, from their writers.
const graphModule = new URL('../packages/core/dist/writers/graph/records.js', import.meta.url);
if (existsSync(graphModule)) {
  const { graphFieldsDocument } = await import(graphModule.href);
  writeFileSync(new URL('../packages/core/schema/graph-fields.json', import.meta.url), JSON.stringify(graphFieldsDocument(), null, 2) + '\n');
}
