import type { ChangeKind } from '../changes/kinds.js';
import type { ClassRun, ClassCounts } from './graph/version-classes.js';
import type { Neighbour } from './graph/degrees.js';
import type { DanglingForeignKey, HistoryEdgeAttributes } from './graph/history-graph.js';
import type { TopologyClass } from './graph/topology-class.js';
import type { ActivityBand } from './lifecycle/activity-band.js';
import type { BirthGroup } from './lifecycle/birth-group.js';
import type { KindCounts } from './lifecycle/counted-updates.js';
import type { Spell } from './lifecycle/presence.js';
import type { AnalysisOptions } from './options.js';
import type { VersionRange } from './ranges.js';
import type { VersionPoint } from './series/version-series.js';
import type { ChiSquareResult } from './stats/chi-square.js';
import type { ContingencyTable } from './stats/contingency.js';
import type { CramersVResult } from './stats/cramers-v.js';
import type { ExactTestResult } from './stats/fisher-exact.js';
import type { KruskalWallisResult } from './stats/kruskal-wallis.js';
import type { SpearmanResult } from './stats/spearman.js';

export interface VersionRef {
  version: number;
  commit: string;
  date: string;
}

/** Graph measures of a table in the history graph, with its class in every version of its life. */
export interface TableGraphMeasures {
  inDegree: number;
  outDegree: number;
  /** inDegree + outDegree: the distinct neighbours used by Spearman's correlation. */
  degree: number;
  selfReferences: number;
  references: Neighbour[];
  referencedBy: Neighbour[];
  class: TopologyClass;
  /** Class in every version of its life, as runs of versions. */
  classes: ClassRun[];
  classChanges: number;
}

/** Every measure of one table that ever existed. */
export interface TableMeasures {
  id: string;
  /** Physical name, namespace, ORM name and kind at the last version that had the table. */
  name: string;
  namespace?: string;
  ormName?: string;
  kind: 'table' | 'implicit-join';
  /** Physical names it had, when it had more than one. */
  formerNames?: string[];
  included: boolean;
  excludedBecause?: string;
  birth: VersionRef;
  removal: VersionRef | null;
  spells: Spell[];
  birthGroup: BirthGroup;
  lifetime: { versions: number; days: number };
  columns: { atBirth: number; atEnd: number };
  changes: KindCounts;
  countedUpdates: number;
  updatesPerVersion: number;
  /** Null below 30 days of life. */
  updatesPerYear: number | null;
  /** Null when the band's basis (a per-year rate) cannot be computed. */
  activityBand: ActivityBand | null;
  /** Null for a table left out of the measures. */
  graph: TableGraphMeasures | null;
}

export interface ContingencyAnalysis {
  table: ContingencyTable;
  /** Tables of the analysis left out of this table (for the activity bands: no band). */
  leftOut: Array<{ table: string; reason: string }>;
  chiSquare: ChiSquareResult;
  exact: ExactTestResult;
  cramersV: CramersVResult;
  reading: string[];
}

export interface Statistics {
  /** Tables the statistics are computed on: each table that ever existed, minus the excluded ones. */
  units: number;
  alpha: number;
  classByBirthGroup: ContingencyAnalysis;
  classByActivityBand: ContingencyAnalysis;
  degreeVersusUpdates: SpearmanResult & { reading: string };
  updatesByClass: KruskalWallisResult & { reading: string };
  caution: string;
}

/** A rename found by the heuristic, as the changes record it. */
export interface HeuristicRename {
  version: number;
  kind: 'table' | 'column';
  table: string;
  from: string;
  to: string;
  evidence: string;
}

export interface HistoryEdge extends HistoryEdgeAttributes {
  key: string;
  source: string;
  target: string;
}

/** The analysis of a history: every measure and statistic (the `analysis` of the interchange file). */
export interface Analysis {
  options: AnalysisOptions & { renames: 'stated' | 'heuristic'; initialCutoff: number };
  summary: {
    versions: number;
    tables: number;
    included: number;
    excluded: number;
    changes: number;
    countedUpdates: number;
    classes: ClassCounts;
    birthGroups: Record<BirthGroup, number>;
    activityBands: Record<ActivityBand, number>;
  };
  tables: TableMeasures[];
  graph: {
    nodes: number;
    edges: HistoryEdge[];
    dangling: DanglingForeignKey[];
  };
  versions: VersionPoint[];
  renames: HeuristicRename[];
  statistics: Statistics;
}

export type { ChangeKind, VersionRange };
