// Writes packages/core/schema/study.schema.json: the JSON Schema (draft 2020-12) of study.json,
// the file `schema-strata study` writes beside the projects' interchange files. The statistics
// and options of the analysis are those of the interchange file's schema (referenced by its $id,
// urn:schema-strata:history:1), so both files describe them once. Run after changing the study's
// output; the tests validate study.json against it and check the codebook is current.
import { readFileSync, writeFileSync } from 'node:fs';

const HISTORY = 'urn:schema-strata:history:1';
const str = (description, extra = {}) => ({ type: 'string', description, ...extra });
const int = (description) => ({ type: 'integer', minimum: 0, description });
const num = (description, extra = {}) => ({ type: 'number', description, ...extra });
const bool = (description) => ({ type: 'boolean', description });
const arr = (description, items) => ({ type: 'array', description, items });
const obj = (description, properties, required = Object.keys(properties)) => ({ type: 'object', description, properties, required, additionalProperties: false });
const ref = (name, description) => ({ $ref: `#/$defs/${name}`, ...(description ? { description } : {}) });
const counts = (description, keys) => obj(description, Object.fromEntries(keys.map((k) => [k, int(`Tables of \`${k}\`.`)])));
const shares = (description) =>
  obj(description, Object.fromEntries(CLASSES.map((k) => [k, { type: ['number', 'null'], minimum: 0, maximum: 100, description: `Percent of class \`${k}\`; null when there is no table.` }])));
const CLASSES = ['isolated', 'source', 'sink', 'intermediate'];

// the study's analysis options: those of an interchange file's analysis, but for the cutoff of
// the initial tables, which each project resolves for itself (see each project's own analysis)
const history = JSON.parse(readFileSync(new URL('../packages/core/schema/history.schema.json', import.meta.url), 'utf8'));
const perFile = history.$defs.analysisOptions;
const { initialCutoff: _cutoff, ...optionProperties } = perFile.properties;
const studyOptions = {
  ...perFile,
  description: 'The analysis options every project was analysed with; `renames` is the rename detection asked for. An `--initial-until` revision is resolved per project (see the `initialCutoff` of each project\'s analysis).',
  properties: optionProperties,
  required: perFile.required.filter((k) => k !== 'initialCutoff'),
};

const $defs = {
  stratumUse: obj(
    'Whether a project took part in a stratified test.',
    { label: str('Project label.'), n: int('Tables of the project in this table.'), used: bool('Whether the project is a stratum of the test (two or more tables).'), reason: str('Why it was left out.') },
    ['label', 'n', 'used'],
  ),
  stratifiedTest: {
    type: 'object',
    description:
      'The Cochran-Mantel-Haenszel test with projects as strata: for a 2 x 2 x K table the Mantel-Haenszel test, for larger tables its generalised form for general association ((I-1)(J-1) degrees of freedom). No continuity correction in `statistic`.',
    properties: {
      computable: bool('Whether the test could be computed; when false, `reason` says why.'),
      reason: str('Why it could not be computed, in plain words.'),
      form: { enum: ['2x2xK', 'IxJxK'], description: '`2x2xK`: the Mantel-Haenszel test; `IxJxK`: the generalised statistic.' },
      statistic: num('M^2.', { minimum: 0 }),
      df: int('Degrees of freedom.'),
      pValue: num('Upper-tail p of the chi-square distribution.', { minimum: 0, maximum: 1 }),
      continuityCorrected: obj('2x2xK only: with the continuity correction.', { statistic: num('M^2 with the correction.', { minimum: 0 }), pValue: num('Its p.', { minimum: 0, maximum: 1 }) }),
      commonOddsRatio: { type: ['number', 'null'], description: '2x2xK only: the Mantel-Haenszel estimate of the common odds ratio; null when its denominator is 0.' },
      rows: arr('Row levels used.', { type: 'string' }),
      columns: arr('Column levels used.', { type: 'string' }),
      droppedRows: arr('Row levels empty in every used project, left out.', { type: 'string' }),
      droppedColumns: arr('Column levels empty in every used project, left out.', { type: 'string' }),
      strata: arr('Every project, used or not.', ref('stratumUse')),
      reading: str('The result in one plain sentence.'),
    },
    required: ['computable', 'strata', 'reading'],
    additionalProperties: false,
  },
  projectRow: obj('One project of the study, side by side with the others.', {
    project: str('Label of the project.'),
    repository: str('The repository as the corpus names it.'),
    head: str('Commit the history was read up to.'),
    adapter: str('Adapter that read the schema.'),
    versions: int('Versions of the schema.'),
    firstDate: str('Committer date of version 0.', { format: 'date-time' }),
    lastDate: str('Committer date of the last version.', { format: 'date-time' }),
    tables: int('Tables that ever existed.'),
    included: int('Tables in the measures (the units of the statistics).'),
    countedUpdates: int('Counted updates of the tables in the measures.'),
    classes: counts('Tables in the measures by topology class (history graph).', CLASSES),
    classShares: shares('The same as percent of the tables in the measures.'),
    birthGroups: counts('Tables in the measures by birth group.', ['initial', 'later']),
    activityBands: counts('Tables in the measures by activity band (those with a band).', ['unchanged', 'low', 'high']),
  }),
  project: obj(
    'A project of the corpus and what became of it.',
    {
      label: str('Label of the project; its interchange file is `<label>.json`.'),
      repository: str('The repository as the corpus names it (path or clone URL).'),
      status: { enum: ['done', 'failed'], description: '`done`: its file is in the study; `failed`: see `reason`.' },
      reason: str('Why it failed.'),
      file: str('Its interchange file, relative to the study directory.'),
      head: str('Commit its history was read up to.'),
    },
    ['label', 'repository', 'status'],
  ),
  studyAnalysis: obj('The pooled analysis of the projects that are done.', {
    options: studyOptions,
    projects: arr('One row per project, in corpus order: the projects side by side.', ref('projectRow')),
    perProject: arr(
      "Each project's own statistics, as in its interchange file.",
      obj('One project\'s statistics.', { project: str('Label of the project.'), statistics: { $ref: `${HISTORY}#/$defs/analysis/properties/statistics` } }),
    ),
    pooled: obj('All projects\' tables taken together as one sample (table ids prefixed by `project/`).', {
      units: int('Tables in the measures, over all projects.'),
      classes: counts('Of them, by topology class.', CLASSES),
      classShares: shares('The same as percent.'),
      statistics: { $ref: `${HISTORY}#/$defs/analysis/properties/statistics` },
    }),
    stratified: obj('The associations tested within projects and combined, projects as strata.', {
      classByBirthGroup: ref('stratifiedTest', 'Topology class by birth group.'),
      classByActivityBand: ref('stratifiedTest', 'Topology class by activity band.'),
    }),
    caution: str('Association is not causation; pooled and stratified tests answer different questions.'),
  }),
};

const schema = {
  $schema: 'https://json-schema.org/draft/2020-12/schema',
  $id: 'urn:schema-strata:study:1',
  title: 'schema-strata study',
  description: 'A study over many repositories, as `schema-strata study` writes it (study.json): every project of the corpus with its status, and the pooled analysis of those done.',
  type: 'object',
  properties: {
    format: { const: 'schema-strata-study', description: 'Format name.' },
    formatVersion: str('Version of this format (semantic versioning).', { pattern: '^\\d+\\.\\d+\\.\\d+$' }),
    generator: obj('The program that wrote the file.', { name: str('Its name.'), version: str('Its version.') }),
    projects: arr('Every project of the corpus, in corpus order.', ref('project')),
    analysis: { oneOf: [ref('studyAnalysis'), { type: 'null' }], description: 'The pooled analysis; null when no project is done.' },
  },
  required: ['format', 'formatVersion', 'generator', 'projects', 'analysis'],
  additionalProperties: false,
  $defs,
};

const target = new URL('../packages/core/schema/study.schema.json', import.meta.url);
const text = JSON.stringify(schema, null, 2) + '\n';
if (process.argv.includes('--check')) {
  // exit 1 when the committed schema is not what this script writes (the tests run this)
  if (readFileSync(target, 'utf8') !== text) {
    console.error('packages/core/schema/study.schema.json is out of date: run node scripts/make-study-schema.mjs');
    process.exit(1);
  }
} else {
  writeFileSync(target, text);
}
