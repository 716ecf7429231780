/**
 * @schema-strata/core: the neutral schema model, the git history engine, the adapter plugin
 * interface, change detection, the interchange file and the CLI.
 */
export * from './extract.js';
export { writeRepository, appendCommits, fastImportStream, type ScriptedCommit } from './demo/git-writer.js';
export { demoStory } from './demo/story.js';
export { main } from './cli/main.js';
export { detectRenames, nameSimilarity, DEFAULT_RENAME_THRESHOLD, type RenameMatch, type RenameMode, type HistoryStep } from './changes/rename-heuristic.js';
export { AliasState } from './changes/aliases.js';
// ---- analysis
export { analyzeDocument, analyzeTimeline, statisticsOf } from './analysis/analyze.js';
export type * from './analysis/types.js';
export {
  DEFAULT_COUNTED_KINDS, DEFAULT_HIGH_ABOVE, DEFAULT_EXACT_LIMIT, DEFAULT_DRAWS, DEFAULT_SEED, BAND_BASES,
  defaultAnalysisOptions, resolveAnalysisOptions, type AnalysisOptions, type BandBasis, type InitialRule, type ExactTestOptions,
} from './analysis/options.js';
export { timelineOf, documentSteps, type Timeline, type TimelineVersion } from './analysis/input/timeline.js';
export { documentFromSnapshots, type SnapshotVersion } from './analysis/input/from-snapshots.js';
export { applyRenames } from './analysis/input/renames.js';
export { exclusionReason, keepsForeignKey } from './analysis/filters/table-filter.js';
export { presenceOf, type Presence, type Spell } from './analysis/lifecycle/presence.js';
export { lifetimeOf, ratesOf, DAYS_PER_YEAR, MIN_DAYS_FOR_YEARLY_RATE } from './analysis/lifecycle/lifetime.js';
export { initialCutoff, birthGroupOf, BIRTH_GROUPS, type BirthGroup } from './analysis/lifecycle/birth-group.js';
export { changeCountsByTable, emptyKindCounts, type KindCounts } from './analysis/lifecycle/counted-updates.js';
export { activityBandOf, ACTIVITY_BANDS, type ActivityBand } from './analysis/lifecycle/activity-band.js';
export { buildHistoryGraph, type HistoryGraph, type DanglingForeignKey } from './analysis/graph/history-graph.js';
export { degreesOf, type Degrees, type Neighbour } from './analysis/graph/degrees.js';
export { topologyClassOf, TOPOLOGY_CLASSES, type TopologyClass } from './analysis/graph/topology-class.js';
export { versionClasses, versionGraph, classChangesOf, type ClassRun, type ClassCounts } from './analysis/graph/version-classes.js';
export { edgeKey, type GraphScope } from './analysis/graph/edges.js';
export { versionSeries, type VersionPoint } from './analysis/series/version-series.js';
export { crossTabulate, fromCounts, testedCounts, type ContingencyTable } from './analysis/stats/contingency.js';
export { chiSquareTest, type ChiSquareResult } from './analysis/stats/chi-square.js';
export { cramersV, type CramersVResult } from './analysis/stats/cramers-v.js';
export { fisherExactTest, RELATIVE_TOLERANCE, type ExactTestResult } from './analysis/stats/fisher-exact.js';
export { spearman, SPEARMAN_EXACT_MAX_N, type SpearmanResult } from './analysis/stats/spearman.js';
export { kruskalWallis, type KruskalWallisResult } from './analysis/stats/kruskal-wallis.js';
export { chiSquareUpperTail, tTwoSidedTail } from './analysis/stats/distributions.js';
export { averageRanks } from './analysis/stats/ranks.js';
export { CAUTION } from './analysis/stats/reading.js';
export { analysisText } from './analysis/text/analysis-text.js';
// ---- writers
export { csvFiles, csvFieldsDocument, TABLE_COLUMNS, CHANGE_COLUMNS, VERSION_COLUMNS, type CsvColumn } from './writers/csv/index.js';
export { exportFormats, type ExportFormat } from './cli/export-command.js';
// ---- studies over many repositories
export { readCorpus, parseCorpus, type Corpus, type CorpusEntry } from './study/corpus.js';
export { runRepository, type RepositoryJob, type RepositoryOutcome, type StudySettings } from './study/runner.js';
export { runStudyJobs, type StudyRequest } from './study/run-study.js';
export { runQueued, startQueueWorker, DEFAULT_QUEUE_NAME, type QueueTarget, type QueueWorkerOptions } from './study/queue.js';
export { analyseStudy, type StudyAnalysis, type ProjectRow, type StudyProject, type StratifiedTest } from './study/pooling.js';
export { cochranMantelHaenszel, type Stratum, type StratifiedResult } from './study/stratified.js';
export { buildStudy, writeStudy, loadStudy, STUDY_FORMAT_NAME, STUDY_FORMAT_VERSION, type StudyDocument, type StudyProjectEntry } from './study/study-document.js';
export { studyTablesCsv, studyProjectsCsv, studyCsvFields, STUDY_TABLE_COLUMNS, PROJECT_COLUMNS } from './study/study-csv.js';
export { gexfFile, GEXF_TIMES, type GexfTime } from './writers/gexf/index.js';
export { graphmlFile } from './writers/graphml/index.js';
export { dotFile } from './writers/dot/index.js';
export { graphRecords, graphFieldsDocument, NODE_ATTRIBUTES, EDGE_ATTRIBUTES, type GraphAttribute, type ExportEdge } from './writers/graph/records.js';
// ---- report
export { buildReport, renderReport, reportData, layoutGraph, layoutIterations, renderSvg, scopeIds, CLASS_COLOURS, HEAT_SCALE, type ReportOptions, type ReportData, type LifetimeRow, type GraphNode, type GraphLink, type Placed } from './report/index.js';
