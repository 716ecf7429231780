import { describe, expect, it } from 'vitest';
import { csvText } from '../../../src/writers/csv/csv-text.js';

describe('CSV text (RFC 4180)', () => {
  it('header row, CRLF, quotes only where needed, doubled inside; empty for null; true/false', () => {
    const text = csvText(
      [
        { name: 'a', type: 'string', description: '', value: (r: { a: string | null }) => r.a },
        { name: 'b', type: 'boolean', description: '', value: () => true },
        { name: 'c', type: 'number', description: '', value: () => 0.1 },
      ],
      [{ a: 'plain' }, { a: 'with, comma' }, { a: 'say "hi"' }, { a: 'two\nlines' }, { a: null }],
    );
    expect(text).toBe('a,b,c\r\nplain,true,0.1\r\n"with, comma",true,0.1\r\n"say ""hi""",true,0.1\r\n"two\nlines",true,0.1\r\n,true,0.1\r\n');
  });
});
