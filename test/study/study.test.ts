import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { appendCommits } from '@schema-strata/core';
import { day, git, makeRepo, MEMBER, prismaSchema, runCli, tempDir, TOOL } from '../helpers/repo.js';
import { startCli } from './processes.js';
import { makeSyntheticRepos, writeCorpus } from './synthetic.js';

const tmp = tempDir('strata-study-');
afterAll(() => tmp.cleanup());

const repos = join(tmp.dir, 'repos');
beforeAll(async () => {
  mkdirSync(repos, { recursive: true });
  await makeSyntheticRepos(repos, 4, { commits: 120, models: 12 });
});

const json = (f: string): Record<string, any> => JSON.parse(readFileSync(f, 'utf8'));
const projectFiles = (dir: string): string[] => readdirSync(dir).filter((f) => f.endsWith('.json') && f !== 'study.json').sort();

describe('study: one interchange file per repository', () => {
  it('writes DIR/<label>.json, the same bytes as `extract --analyze` writes for the same repository and options', () => {
    const corpus = writeCorpus(join(repos, 'corpus.json'), {
      defaults: { adapter: 'prisma' },
      repositories: [
        { label: 'north-shed', repository: 'coop1' },
        { label: 'south-shed', repository: 'coop2', paths: ['prisma/schema.prisma'], options: { 'prisma-join-key': 'unique' } },
        { repository: 'coop3', ref: 'HEAD~20' },
      ],
    });
    const out = join(tmp.dir, 'out-extract');
    const r = runCli(['study', corpus, '-o', out, '--jobs', '2', '--no-cache']);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('study of 3 repositories: 3 extracted, 0 unchanged since the last run, 0 failed');
    expect(projectFiles(out)).toEqual(['coop3.json', 'north-shed.json', 'south-shed.json']);
    // the oracle: `extract --analyze` run by hand in the corpus's folder, with the options of each entry
    const byHand = (name: string, args: string[]): Buffer => {
      const f = join(tmp.dir, `${name}-by-hand.json`);
      const e = runCli(['extract', ...args, '--analyze', '--adapter', 'prisma', '--no-cache', '--quiet', '-o', f], { cwd: repos });
      expect(e.code).toBe(0);
      return readFileSync(f);
    };
    expect(readFileSync(join(out, 'north-shed.json')).equals(byHand('north', ['coop1']))).toBe(true);
    expect(readFileSync(join(out, 'south-shed.json')).equals(byHand('south', ['coop2', '--path', 'prisma/schema.prisma', '--prisma-join-key', 'unique']))).toBe(true);
    expect(readFileSync(join(out, 'coop3.json')).equals(byHand('coop3', ['coop3', '--ref', 'HEAD~20']))).toBe(true);
    expect(json(join(out, 'coop3.json')).source.head).toBe(git(join(repos, 'coop3'), 'rev-parse', 'HEAD~20').trim());
  });

  it('reads a plain text corpus: one path per line, comments and blank lines skipped', () => {
    const list = join(repos, 'list.txt');
    writeFileSync(list, '# the co-op sheds\ncoop1\n\n  coop2  \n');
    const out = join(tmp.dir, 'out-text');
    const r = runCli(['study', list, '-o', out, '--no-cache', '--quiet']);
    expect(r.code).toBe(0);
    expect(projectFiles(out)).toEqual(['coop1.json', 'coop2.json']);
    expect(json(join(out, 'coop1.json')).source.repository).toBe('coop1');
  });
});

describe('study: the analysis options', () => {
  it('reach every project as `extract --analyze` takes them, and a change of them makes the projects run again', () => {
    const list = join(repos, 'two.txt');
    writeFileSync(list, 'coop1\ncoop2\n');
    const out = join(tmp.dir, 'out-options');
    const r = runCli(['study', list, '-o', out, '--no-cache', '--quiet', '--high-above', '2', '--count', 'column-added,column-removed']);
    expect(r.code).toBe(0);
    const f = join(tmp.dir, 'coop1-options.json');
    expect(runCli(['extract', 'coop1', '--analyze', '--high-above', '2', '--count', 'column-added,column-removed', '--no-cache', '--quiet', '-o', f], { cwd: repos }).code).toBe(0);
    expect(readFileSync(join(out, 'coop1.json')).equals(readFileSync(f))).toBe(true);
    expect(json(join(out, 'study.json')).analysis.options.highAbove).toBe(2);
    const same = runCli(['study', list, '-o', out, '--no-cache', '--quiet', '--high-above', '2', '--count', 'column-added,column-removed']);
    expect(same.stdout).toContain('0 extracted, 2 unchanged');
    const other = runCli(['study', list, '-o', out, '--no-cache', '--quiet', '--high-above', '3']);
    expect(other.stdout).toContain('2 extracted, 0 unchanged');
    expect(json(join(out, 'coop2.json')).analysis.options.highAbove).toBe(3);
    const bad = runCli(['study', list, '-o', out, '--high-above', 'lots']);
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim()).toBe('schema-strata: --high-above lots: not a number');
  });
});

describe('study: resumable', () => {
  it('a re-run redoes nothing; a new commit makes only that repository run again', async () => {
    const root = join(tmp.dir, 'resume');
    const [a, b] = await makeSyntheticRepos(root, 2, { commits: 60, models: 8, prefix: 'desk' });
    const corpus = writeCorpus(join(root, 'corpus.json'), [a, b]);
    const out = join(root, 'out');
    expect(runCli(['study', corpus, '-o', out, '--no-cache', '--quiet']).code).toBe(0);
    const mtimes = projectFiles(out).map((f) => statSync(join(out, f)).mtimeMs);
    const again = runCli(['study', corpus, '-o', out, '--no-cache', '--quiet']);
    expect(again.code).toBe(0);
    expect(again.stdout).toContain('0 extracted, 2 unchanged since the last run, 0 failed');
    expect(projectFiles(out).map((f) => statSync(join(out, f)).mtimeMs)).toEqual(mtimes);

    await appendCommits(b!, [{ date: day(900), message: 'repairs table', files: { 'prisma/schema.prisma': prismaSchema(MEMBER.replace('  loans Loan[]\n', '') + 'model Repair {\n  id Int @id\n}\n') } }]);
    const third = runCli(['study', corpus, '-o', out, '--no-cache', '--quiet']);
    expect(third.stdout).toContain('1 extracted, 1 unchanged since the last run, 0 failed');
    expect(statSync(join(out, 'desk1.json')).mtimeMs).toBe(mtimes[0]);
    expect(json(join(out, 'desk2.json')).source.head).toBe(git(b!, 'rev-parse', 'HEAD').trim());

    // a result file changed by hand is not trusted: it is made again
    writeFileSync(join(out, 'desk1.json'), '{}\n');
    const fourth = runCli(['study', corpus, '-o', out, '--no-cache', '--quiet']);
    expect(fourth.stdout).toContain('1 extracted, 1 unchanged since the last run, 0 failed');
    expect(json(join(out, 'desk1.json')).format).toBe('schema-strata-history');
  });

  it('after an interruption, only what was not finished is done, and the results are the same bytes', async () => {
    const corpus = writeCorpus(join(repos, 'all.json'), ['coop1', 'coop2', 'coop3', 'coop4']);
    const reference = join(tmp.dir, 'out-reference');
    expect(runCli(['study', corpus, '-o', reference, '--no-cache', '--quiet']).code).toBe(0);

    const out = join(tmp.dir, 'out-interrupted');
    const s = startCli(['study', corpus, '-o', out, '--jobs', '1', '--no-cache', '--quiet']);
    const stateDir = join(out, '.study-state');
    const deadline = Date.now() + 60_000;
    while (!(existsSync(stateDir) && readdirSync(stateDir).length >= 1) && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
    s.proc.kill('SIGKILL');
    await s.exited;
    const finished = readdirSync(stateDir).length;
    expect(finished).toBeGreaterThanOrEqual(1);
    expect(finished).toBeLessThan(4);

    const resumed = runCli(['study', corpus, '-o', out, '--no-cache', '--quiet']);
    expect(resumed.code).toBe(0);
    expect(resumed.stdout).toContain(`${4 - finished} extracted, ${finished} unchanged since the last run, 0 failed`);
    expect(projectFiles(out)).toEqual(projectFiles(reference));
    for (const f of projectFiles(reference)) expect(readFileSync(join(out, f)).equals(readFileSync(join(reference, f))), f).toBe(true);
  });
});

describe('study: one repository failing does not stop the others', () => {
  it('logs each failure with its reason, goes on, and exits with code 1', async () => {
    const root = join(tmp.dir, 'failures');
    mkdirSync(root, { recursive: true });
    git(root, 'init', '-q', 'empty');
    await makeRepo(root, 'no-schema', [{ date: day(0), message: 'docs only', files: { 'README.md': 'lending rules\n' } }]);
    await makeRepo(root, 'tools', [{ date: day(0), message: 'tools', files: { 'prisma/schema.prisma': prismaSchema(TOOL.replace('  loans Loan[]\n', '')) } }]);
    const corpus = writeCorpus(join(root, 'corpus.json'), {
      repositories: [
        'empty',
        'missing',
        'no-schema',
        { label: 'bad-option', repository: 'tools', adapter: 'prisma', options: { 'prisma-join-key': 'sideways' } },
        { label: 'tools', repository: 'tools' },
      ],
    });
    const out = join(root, 'out');
    const r = runCli(['study', corpus, '-o', out, '--no-cache', '--quiet']);
    expect(r.code).toBe(1);
    expect(r.stdout).toContain('study of 5 repositories: 1 extracted, 0 unchanged since the last run, 4 failed');
    expect(r.stdout).toMatch(/ {2}empty: .*is an empty repository/);
    expect(r.stdout).toMatch(/ {2}missing: .*no such directory/);
    expect(r.stdout).toMatch(/ {2}no-schema: no schema found/);
    expect(r.stdout).toContain('  bad-option: option --prisma-join-key of adapter prisma: "sideways" is not one of auto, primary-key, unique');
    expect(projectFiles(out)).toEqual(['tools.json']);
    expect(r.stdout).not.toMatch(/\n\s+at /);
  });

  it("reads each repository's own configuration file (through the run's git process), as `extract` does", async () => {
    const root = join(tmp.dir, 'configured');
    mkdirSync(root, { recursive: true });
    // the schema where nothing would find it: only the configuration's paths point at it
    const config = JSON.stringify({ adapter: 'prisma', paths: ['db/lending.prisma'], options: { 'prisma-join-key': 'unique' } });
    await makeRepo(root, 'lending', [
      { date: day(0), message: 'tools', files: { 'db/lending.prisma': prismaSchema(TOOL.replace('  loans Loan[]\n', '')), 'schema-strata.config.json': config } },
      { date: day(1), message: 'members', files: { 'db/lending.prisma': prismaSchema(TOOL.replace('  loans Loan[]\n', '') + '\n' + MEMBER.replace('  loans Loan[]\n', '')) } },
    ]);
    await makeRepo(root, 'broken', [{ date: day(0), message: 'tools', files: { 'prisma/schema.prisma': prismaSchema(TOOL.replace('  loans Loan[]\n', '')), 'schema-strata.config.json': '{ "adapter": ' } }]);
    const corpus = writeCorpus(join(root, 'corpus.json'), { repositories: ['lending', 'broken'] });
    const out = join(root, 'out');
    const r = runCli(['study', corpus, '-o', out, '--no-cache', '--quiet']);
    expect(r.code).toBe(1);
    expect(r.stdout).toContain('study of 2 repositories: 1 extracted, 0 unchanged since the last run, 1 failed');
    expect(r.stdout).toMatch(/ {2}broken: schema-strata\.config\.json \(in the repository at HEAD\): not valid JSON/);
    const f = join(root, 'lending-by-hand.json');
    const e = runCli(['extract', 'lending', '--analyze', '--no-cache', '--quiet', '-o', f], { cwd: root });
    expect(e.code).toBe(0);
    expect(json(f).summary.tableIds).toBe(2);
    expect(readFileSync(join(out, 'lending.json')).equals(readFileSync(f))).toBe(true);
  });
});

describe('study: repositories named by clone URL', () => {
  it('clones them with full history into the cache directory, updates them on a re-run, and names the URL in the file', async () => {
    const root = join(tmp.dir, 'remote');
    const [origin] = await makeSyntheticRepos(root, 1, { commits: 40, models: 6, prefix: 'origin' });
    const url = pathToFileURL(origin!).href;
    const corpus = writeCorpus(join(root, 'corpus.json'), [{ label: 'far-shed', repository: url, adapter: 'prisma' }]);
    const cache = join(root, 'cache');
    const out = join(root, 'out');
    const r = runCli(['study', corpus, '-o', out, '--cache-dir', cache, '--quiet']);
    expect(r.code).toBe(0);
    const clones = readdirSync(join(cache, 'clones'));
    expect(clones).toHaveLength(1);
    const clone = join(cache, 'clones', clones[0]!);
    // full history: git itself counts the same commits in the clone as in the origin
    expect(git(clone, 'rev-list', '--count', 'HEAD')).toBe(git(origin!, 'rev-list', '--count', 'HEAD'));
    const doc = json(join(out, 'far-shed.json'));
    expect(doc.source.repository).toBe(url);
    expect(JSON.stringify(doc)).not.toContain(cache);
    // the same history read from its local path gives the same file but for the repository field
    const local = join(root, 'local.json');
    expect(runCli(['extract', origin!, '--analyze', '--adapter', 'prisma', '--no-cache', '--quiet', '-o', local]).code).toBe(0);
    const l = json(local);
    l.source.repository = url;
    expect(doc).toEqual(l);

    await appendCommits(origin!, [{ date: day(2000), message: 'member table', files: { 'prisma/schema.prisma': prismaSchema(MEMBER.replace('  loans Loan[]\n', '')) } }]);
    const offline = runCli(['study', corpus, '-o', out, '--cache-dir', cache, '--no-update', '--quiet']);
    expect(offline.stdout).toContain('0 extracted, 1 unchanged');
    const updated = runCli(['study', corpus, '-o', out, '--cache-dir', cache, '--quiet']);
    expect(updated.stdout).toContain('1 extracted, 0 unchanged');
    expect(json(join(out, 'far-shed.json')).source.head).toBe(git(origin!, 'rev-parse', 'HEAD').trim());
  });

  it('a URL that cannot be cloned is a failure of that repository, with git\'s reason', () => {
    const root = join(tmp.dir, 'remote-bad');
    mkdirSync(root, { recursive: true });
    const corpus = writeCorpus(join(root, 'corpus.json'), [pathToFileURL(join(root, 'nothing-here')).href]);
    const r = runCli(['study', corpus, '-o', join(root, 'out'), '--cache-dir', join(root, 'cache'), '--quiet']);
    expect(r.code).toBe(1);
    expect(r.stdout).toMatch(/ {2}nothing-here: cannot clone file:\/\/.*nothing-here: /);
    expect(readdirSync(join(root, 'cache', 'clones'))).toEqual([]);
  });
});

describe('study: usage errors are one line with exit code 2', () => {
  const oneLine = (r: { code: number; stderr: string }): void => {
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^schema-strata: /);
  };
  it.each([
    ['a label used twice', { repositories: [{ label: 'a', repository: 'coop1' }, { label: 'A', repository: 'coop2' }] }, 'label "A" is used twice'],
    ['a reserved label', [{ label: 'study', repository: 'coop1' }], 'label "study" is reserved'],
    ['an unknown key', [{ repository: 'coop1', adaptor: 'prisma' }], 'unknown key "adaptor"'],
    ['no repository', { repositories: [] }, 'lists no repository'],
  ])('%s', (_name, body, message) => {
    const f = writeCorpus(join(tmp.dir, `bad-${Math.random().toString(36).slice(2)}.json`), body);
    const r = runCli(['study', f, '-o', join(tmp.dir, 'never')]);
    oneLine(r);
    expect(r.stderr).toContain(message);
    expect(existsSync(join(tmp.dir, 'never'))).toBe(false);
  });
  it('bad JSON, a missing corpus, --jobs 0', () => {
    const f = join(tmp.dir, 'broken.json');
    writeFileSync(f, '{ "repositories": [ ');
    oneLine(runCli(['study', f]));
    oneLine(runCli(['study', join(tmp.dir, 'absent.json')]));
    const ok = writeCorpus(join(tmp.dir, 'ok.json'), ['coop1']);
    const j = runCli(['study', ok, '--jobs', '0']);
    oneLine(j);
    expect(j.stderr).toContain('--jobs 0: must be a whole number >= 1');
  });
});
