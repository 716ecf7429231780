import { resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { isCloneUrl, labelOf, parseCorpus } from '../../src/study/corpus.js';

const at = '/data/corpora/sheds.json';

describe('corpus files', () => {
  it('JSON: defaults, entries as objects or strings, paths relative to the corpus file, labels', () => {
    const c = parseCorpus(
      JSON.stringify({
        defaults: { adapter: 'prisma', ref: 'main', options: { 'prisma-join-key': 'unique' } },
        repositories: [
          { label: 'north-shed', repository: 'repos/north', paths: ['db/schema.prisma'], since: '2023-01-01' },
          'repos/south/',
          { repository: 'https://example.invalid/coop/river-shed.git', adapter: 'auto', options: { '--prisma-join-key': 'auto' } },
          { repository: '/srv/git/lake' },
        ],
      }),
      at,
    );
    expect(c.entries.map((e) => e.label)).toEqual(['north-shed', 'south', 'river-shed', 'lake']);
    const [north, south, river, lake] = c.entries;
    expect(north).toEqual({
      label: 'north-shed',
      repository: 'repos/north',
      location: resolve('/data/corpora/repos/north'),
      remote: false,
      adapter: 'prisma',
      adapterGiven: true,
      paths: ['db/schema.prisma'],
      ref: 'main',
      since: '2023-01-01',
      options: { 'prisma-join-key': 'unique' },
    });
    expect(south!.location).toBe(resolve('/data/corpora/repos/south'));
    expect(river).toMatchObject({ remote: true, location: 'https://example.invalid/coop/river-shed.git', adapter: 'auto', adapterGiven: true, options: { 'prisma-join-key': 'auto' } });
    expect(lake).toMatchObject({ location: '/srv/git/lake', ref: 'main', adapter: 'prisma' });
  });

  it('a bare list, and a text file with one path or URL per line', () => {
    expect(parseCorpus('["a", "b"]', at).entries.map((e) => [e.label, e.adapter, e.adapterGiven, e.ref])).toEqual([['a', 'auto', false, 'HEAD'], ['b', 'auto', false, 'HEAD']]);
    const t = parseCorpus('# sheds\n\nrepos/north\r\n  git@example.invalid:coop/south.git  \n', at);
    expect(t.entries.map((e) => [e.label, e.remote])).toEqual([['north', false], ['south', true]]);
  });

  it('derived labels that collide get -2, -3 ...; given labels are never taken by a derived one', () => {
    const c = parseCorpus(JSON.stringify(['x/shed', 'y/shed', { label: 'shed-2', repository: 'z' }, 'w/study', 'v/Shed']), at);
    expect(c.entries.map((e) => e.label)).toEqual(['shed', 'shed-3', 'shed-2', 'study-2', 'Shed-4']);
  });

  it('clone URLs and labels', () => {
    for (const u of ['https://example.invalid/a.git', 'ssh://git@example.invalid/a', 'file:///srv/a', 'git@example.invalid:coop/a.git']) expect(isCloneUrl(u)).toBe(true);
    for (const p of ['a', './a', '/srv/a', 'C:/a', 'a@b']) expect(isCloneUrl(p)).toBe(false);
    expect(labelOf('https://example.invalid/coop/tool shed.git')).toBe('tool-shed');
    expect(labelOf('git@example.invalid:coop/loans.git')).toBe('loans');
    expect(labelOf('/')).toBe('repository');
  });

  it.each([
    ['not JSON', '{ "repositories": [', 'not valid JSON'],
    ['no list', '{ "repositories": 3 }', '"repositories" must be a list'],
    ['unknown top key', '{ "repos": [] }', 'unknown key "repos"'],
    ['entry without repository', '[{ "label": "a" }]', 'repository 1: "repository" (a path or a clone URL) is required'],
    ['bad label', '[{ "label": "../up", "repository": "a" }]', 'label "../up" must be letters'],
    ['bad option value', '[{ "repository": "a", "options": { "x": 3 } }]', 'option "x" must be a string, a boolean or a list of strings'],
    ['bad paths', '[{ "repository": "a", "paths": "db" }]', '"paths": must be a list of non-empty strings'],
    ['empty text', '# nothing\n\n', 'lists no repository'],
  ])('%s is a one-line usage error', (_n, text, message) => {
    expect(() => parseCorpus(text, at)).toThrow(message);
    try {
      parseCorpus(text, at);
    } catch (e) {
      expect((e as { exitCode: number }).exitCode).toBe(2);
      expect((e as Error).message).toMatch(new RegExp(`^${at.replace(/[/.]/g, '\\$&')}: `));
      expect((e as Error).message).not.toContain('\n');
    }
  });
});
