import { TOPOLOGY_CLASSES } from '../analysis/graph/topology-class.js';
import { ACTIVITY_BANDS } from '../analysis/lifecycle/activity-band.js';
import { BIRTH_GROUPS } from '../analysis/lifecycle/birth-group.js';
import type { ContingencyAnalysis, Statistics, TableMeasures } from '../analysis/types.js';
import { csvText, type CsvColumn } from '../writers/csv/csv-text.js';
import { TABLE_COLUMNS } from '../writers/csv/tables-csv.js';
import type { ProjectRow, StudyAnalysis } from './pooling.js';

/** A table of a project, for the study's tables.csv. */
export interface ProjectTable {
  project: string;
  table: TableMeasures;
}

/** Columns of a study's tables.csv: `project`, then every column of a history's tables.csv. */
export const STUDY_TABLE_COLUMNS: readonly CsvColumn<ProjectTable>[] = [
  { name: 'project', type: 'string', description: 'Label of the project (repository) in the corpus.', value: (r) => r.project },
  ...TABLE_COLUMNS.map((c): CsvColumn<ProjectTable> => ({ ...c, value: (r) => c.value(r.table) })),
];

/** tables.csv of a study: one row per table of every project, in corpus order (tidy: one project column). */
export function studyTablesCsv(rows: readonly ProjectTable[]): string {
  return csvText(STUDY_TABLE_COLUMNS, rows);
}

interface ProjectCsvRow {
  row: ProjectRow;
  statistics: Statistics;
}

const pOf = (c: ContingencyAnalysis, test: 'chiSquare' | 'exact'): number | null => (c[test].computable ? c[test].pValue : null);
const vOf = (c: ContingencyAnalysis): number | null => (c.cramersV.computable ? c.cramersV.value : null);

/** Columns of a study's projects.csv: one row per project, the projects side by side. */
export const PROJECT_COLUMNS: readonly CsvColumn<ProjectCsvRow>[] = [
  { name: 'project', type: 'string', description: 'Label of the project in the corpus.', value: (r) => r.row.project },
  { name: 'repository', type: 'string', description: 'The repository as the corpus names it (path or clone URL).', value: (r) => r.row.repository },
  { name: 'head', type: 'string', description: 'Commit the history was read up to.', value: (r) => r.row.head },
  { name: 'adapter', type: 'string', description: 'Adapter that read the schema.', value: (r) => r.row.adapter },
  { name: 'versions', type: 'integer', description: 'Versions of the schema.', value: (r) => r.row.versions },
  { name: 'first_date', type: 'date-time', description: 'Committer date of version 0.', value: (r) => r.row.firstDate },
  { name: 'last_date', type: 'date-time', description: 'Committer date of the last version.', value: (r) => r.row.lastDate },
  { name: 'tables', type: 'integer', description: 'Tables that ever existed.', value: (r) => r.row.tables },
  { name: 'included', type: 'integer', description: 'Tables in the measures (the units of the statistics).', value: (r) => r.row.included },
  { name: 'counted_updates', type: 'integer', description: 'Counted updates of the tables in the measures.', value: (r) => r.row.countedUpdates },
  ...TOPOLOGY_CLASSES.flatMap((c): CsvColumn<ProjectCsvRow>[] => [
    { name: c, type: 'integer', description: `Tables in the measures of class \`${c}\` (history graph).`, value: (r) => r.row.classes[c] },
    { name: `${c}_percent`, type: 'number', description: `Share of class \`${c}\` among the tables in the measures, in percent.`, value: (r) => r.row.classShares[c] },
  ]),
  ...BIRTH_GROUPS.map((g): CsvColumn<ProjectCsvRow> => ({ name: g, type: 'integer', description: `Tables in the measures of birth group \`${g}\`.`, value: (r) => r.row.birthGroups[g] })),
  ...ACTIVITY_BANDS.map((b): CsvColumn<ProjectCsvRow> => ({ name: b, type: 'integer', description: `Tables in the measures of activity band \`${b}\`.`, value: (r) => r.row.activityBands[b] })),
  { name: 'birth_chi_square_p', type: 'number', description: 'p of the chi-square test of class by birth group in this project; empty when not computable.', value: (r) => pOf(r.statistics.classByBirthGroup, 'chiSquare') },
  { name: 'birth_exact_p', type: 'number', description: 'p of the exact test of class by birth group.', value: (r) => pOf(r.statistics.classByBirthGroup, 'exact') },
  { name: 'birth_cramers_v', type: 'number', description: "Cramer's V of class by birth group.", value: (r) => vOf(r.statistics.classByBirthGroup) },
  { name: 'band_chi_square_p', type: 'number', description: 'p of the chi-square test of class by activity band.', value: (r) => pOf(r.statistics.classByActivityBand, 'chiSquare') },
  { name: 'band_exact_p', type: 'number', description: 'p of the exact test of class by activity band.', value: (r) => pOf(r.statistics.classByActivityBand, 'exact') },
  { name: 'band_cramers_v', type: 'number', description: "Cramer's V of class by activity band.", value: (r) => vOf(r.statistics.classByActivityBand) },
  { name: 'spearman_rho', type: 'number', description: "Spearman's rho of distinct neighbours and counted updates.", value: (r) => (r.statistics.degreeVersusUpdates.computable ? r.statistics.degreeVersusUpdates.rho : null) },
  { name: 'spearman_p', type: 'number', description: "p of Spearman's correlation.", value: (r) => (r.statistics.degreeVersusUpdates.computable ? r.statistics.degreeVersusUpdates.pValue : null) },
  { name: 'kruskal_wallis_p', type: 'number', description: 'p of the Kruskal-Wallis test of counted updates across classes.', value: (r) => (r.statistics.updatesByClass.computable ? r.statistics.updatesByClass.pValue : null) },
];

/** projects.csv of a study. */
export function studyProjectsCsv(a: StudyAnalysis): string {
  return csvText(PROJECT_COLUMNS, a.projects.map((row, i) => ({ row, statistics: a.perProject[i]!.statistics })));
}

/** The study's CSV files and their columns, for the codebook. */
export function studyCsvFields(): Record<string, { description: string; columns: Array<{ name: string; type: string; description: string }> }> {
  const cols = <T>(c: readonly CsvColumn<T>[]) => c.map(({ name, type, description }) => ({ name, type, description }));
  return {
    'tables.csv (study)': { description: 'Written by `schema-strata study` into its output directory: one row per table of every project, with a project column.', columns: cols(STUDY_TABLE_COLUMNS) },
    'projects.csv (study)': { description: 'Written by `schema-strata study`: one row per analysed project, its class shares and the p-values of its tests.', columns: cols(PROJECT_COLUMNS) },
  };
}
