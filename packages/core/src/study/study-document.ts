import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyzeTimeline } from '../analysis/analyze.js';
import { timelineOf } from '../analysis/input/timeline.js';
import type { AnalysisOptions } from '../analysis/options.js';
import type { Analysis } from '../analysis/types.js';
import { FORMAT_NAME, serialiseDocument, type InterchangeDocument } from '../interchange/document.js';
import { writeFileAtomic } from '../util/atomic-write.js';
import { UsageError, EXIT } from '../util/errors.js';
import { GENERATOR } from '../version.js';
import { analyseStudy, type StudyAnalysis, type StudyOptions, type StudyProject } from './pooling.js';
import type { RepositoryOutcome } from './runner.js';
import { studyProjectsCsv, studyTablesCsv } from './study-csv.js';
import { resultFileOf, sha256, STATE_DIR } from './state.js';
import { canonicalJson } from '../model/canonical.js';

export const STUDY_FORMAT_NAME = 'schema-strata-study';
export const STUDY_FORMAT_VERSION = '1.0.0';
/** The study's own file in its output directory. */
export const STUDY_FILE = 'study.json';

/** A project of the corpus as study.json lists it. */
export interface StudyProjectEntry {
  label: string;
  repository: string;
  /** `done`: its interchange file `file` is in the study; `failed`: why not, in `reason`. */
  status: 'done' | 'failed';
  reason?: string;
  file?: string;
  head?: string;
}

/**
 * study.json: every project of the corpus with its status, and the pooled analysis of the
 * projects that are done (null when none is). Deterministic: the same projects' files and
 * options give the same bytes, whether the study ran at once, resumed or on a queue.
 */
export interface StudyDocument {
  format: typeof STUDY_FORMAT_NAME;
  formatVersion: string;
  generator: { name: string; version: string };
  projects: StudyProjectEntry[];
  analysis: StudyAnalysis | null;
}

/** Read one project's interchange file; its analysis is the embedded one, else computed with `options`. */
export function readProject(dir: string, label: string, options: AnalysisOptions): StudyProject {
  const file = resultFileOf(dir, label);
  const doc = JSON.parse(readFileSync(file, 'utf8')) as InterchangeDocument;
  if (doc.format !== FORMAT_NAME) throw new UsageError(`${file}: not a ${FORMAT_NAME} file`, EXIT.failure);
  const analysis = (doc.analysis as Analysis | undefined) ?? analyzeTimeline(timelineOf(doc), options);
  // keep what the study needs: the source, the summary and the analysis (not the snapshots)
  return { label, doc: { source: doc.source, summary: doc.summary } as InterchangeDocument, analysis };
}

/**
 * Build the study of a run: the projects in corpus order (`outcomes`), the done ones read from
 * `dir` and pooled. The repository of a project is named as the corpus wrote it.
 */
export function buildStudy(dir: string, outcomes: readonly RepositoryOutcome[], repositories: ReadonlyMap<string, string>, options: StudyOptions): { study: StudyDocument; projects: StudyProject[] } {
  const projects: StudyProject[] = [];
  const entries: StudyProjectEntry[] = outcomes.map((o) => {
    const repository = repositories.get(o.label) ?? '';
    if (o.status === 'failed') return { label: o.label, repository, status: 'failed', reason: o.reason ?? 'failed', ...(o.head ? { head: o.head } : {}) };
    try {
      projects.push(readProject(dir, o.label, options));
    } catch (e) {
      // a worker wrote it where this machine does not see it, or it was removed meanwhile
      const why = (e as NodeJS.ErrnoException).code === 'ENOENT' ? 'is not in the output directory (with --queue, the directory must be shared storage that every worker sees)' : `cannot be read (${(e as Error).message})`;
      return { label: o.label, repository, status: 'failed', reason: `its result ${o.label}.json ${why}`, ...(o.head ? { head: o.head } : {}) };
    }
    return { label: o.label, repository, status: 'done', file: `${o.label}.json`, head: o.head! };
  });
  return {
    study: {
      format: STUDY_FORMAT_NAME,
      formatVersion: STUDY_FORMAT_VERSION,
      generator: { ...GENERATOR },
      projects: entries,
      analysis: projects.length > 0 ? analyseStudy(projects, options) : null,
    },
    projects,
  };
}

/** Write study.json, and with an analysis tables.csv (every project's tables) and projects.csv, into `dir` (atomically). */
export function writeStudy(dir: string, study: StudyDocument, projects: readonly StudyProject[]): string[] {
  const written = [STUDY_FILE];
  writeFileAtomic(join(dir, STUDY_FILE), serialiseDocument(study));
  if (study.analysis) {
    writeFileAtomic(join(dir, 'tables.csv'), studyTablesCsv(projects.flatMap((p) => p.analysis.tables.map((table) => ({ project: p.label, table })))));
    writeFileAtomic(join(dir, 'projects.csv'), studyProjectsCsv(study.analysis));
    written.push('tables.csv', 'projects.csv');
  }
  return written;
}

/** What the study remembers of its last pooling (`DIR/.study-state/_pooled.json`; no label starts with `_`). */
interface PoolState {
  key: string;
  files: Record<string, string>;
}

/**
 * Pool a study's projects into `dir` (study.json, tables.csv, projects.csv), or keep the files of
 * the last pooling when its inputs are the same: every project's status, head, reason and result
 * (by SHA-256), the options and schema-strata's version, and the files are still as written.
 * A re-run that finds nothing changed then reads no project file at all.
 */
export function poolStudy(
  dir: string,
  outcomes: readonly RepositoryOutcome[],
  repositories: ReadonlyMap<string, string>,
  options: StudyOptions,
): { study: StudyDocument; /** The study's files (written now, or kept). */ written: string[]; reused: boolean } {
  const key = sha256(
    canonicalJson({
      generator: GENERATOR,
      options,
      projects: outcomes.map((o) => ({ label: o.label, repository: repositories.get(o.label), failed: o.status === 'failed', reason: o.reason, head: o.head, result: o.result?.sha256 })),
    }),
  );
  const stateFile = join(dir, STATE_DIR, '_pooled.json');
  try {
    const last = JSON.parse(readFileSync(stateFile, 'utf8')) as PoolState;
    const intact = Object.entries(last.files).every(([f, h]) => existsSync(join(dir, f)) && sha256(readFileSync(join(dir, f))) === h);
    if (last.key === key && intact) return { study: JSON.parse(readFileSync(join(dir, STUDY_FILE), 'utf8')) as StudyDocument, written: Object.keys(last.files), reused: true };
  } catch {
    // no state, or not readable: pool again
  }
  const { study, projects } = buildStudy(dir, outcomes, repositories, options);
  const written = writeStudy(dir, study, projects);
  const files = Object.fromEntries(written.map((f) => [f, sha256(readFileSync(join(dir, f)))]));
  writeFileAtomic(stateFile, JSON.stringify({ key, files } satisfies PoolState, null, 2) + '\n');
  return { study, written, reused: false };
}

/**
 * The pooled data of a study directory, for reports and other tools: study.json (every
 * project's status, the projects side by side, each project's statistics, the pooled
 * statistics and the stratified tests; see `StudyDocument` and `StudyAnalysis`), and a reader
 * of each done project's full interchange document (for per-project charts).
 *
 * ```ts
 * const s = loadStudy('study-out');
 * for (const p of s.study.projects.filter((p) => p.status === 'done')) {
 *   const doc = s.project(p.label); // the project's interchange file, with its analysis
 * }
 * s.study.analysis?.stratified.classByBirthGroup.reading;
 * ```
 */
export function loadStudy(dir: string): { study: StudyDocument; project(label: string): InterchangeDocument } {
  const file = join(dir, STUDY_FILE);
  if (!existsSync(file)) throw new UsageError(`${dir}: no ${STUDY_FILE} (write one with \`schema-strata study\`)`, EXIT.usage);
  let study: StudyDocument;
  try {
    study = JSON.parse(readFileSync(file, 'utf8')) as StudyDocument;
  } catch (e) {
    throw new UsageError(`${file}: not valid JSON (${(e as Error).message})`, EXIT.usage);
  }
  if (study.format !== STUDY_FORMAT_NAME) throw new UsageError(`${file}: not a ${STUDY_FORMAT_NAME} file`, EXIT.usage);
  return {
    study,
    project(label: string): InterchangeDocument {
      const p = study.projects.find((x) => x.label === label && x.status === 'done');
      if (!p) throw new UsageError(`${dir}: no done project "${label}" in the study`, EXIT.usage);
      return JSON.parse(readFileSync(join(dir, p.file!), 'utf8')) as InterchangeDocument;
    },
  };
}
