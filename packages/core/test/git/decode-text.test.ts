// A blob's text: the ASCII fast path must give exactly what Node's UTF-8 decoder gives (the
// oracle: TextDecoder, WHATWG's UTF-8 decoding with replacement characters), on ASCII text,
// text with accents, emoji and a byte-order mark, broken UTF-8 and nothing at all.
import { describe, expect, it } from 'vitest';
import { decodeText } from '../../src/git/blob-reader.js';

const utf8 = new TextDecoder('utf-8', { ignoreBOM: true });

describe('decodeText', () => {
  const cases: Array<[string, Buffer]> = [
    ['ASCII source', Buffer.from("export const shelf = 'A-3';\n// tool lending\n\tindented\r\n")],
    ['every ASCII byte', Buffer.from(Array.from({ length: 128 }, (_, i) => i))],
    ['accents and emoji', Buffer.from("model Tool { label String // étiquette, 工具, 🔧 }\n")],
    ['a byte-order mark', Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from('model Loan {}\n')])],
    ['broken UTF-8', Buffer.from([0x61, 0xc3, 0x28, 0x62, 0xff, 0x80, 0x63])],
    ['Latin-1 bytes that are not UTF-8', Buffer.from([0x63, 0x61, 0x66, 0xe9, 0x0a])],
    ['empty', Buffer.alloc(0)],
  ];
  for (const [name, bytes] of cases) {
    it(`${name}: the text the UTF-8 decoder gives`, () => {
      expect(decodeText(bytes)).toBe(utf8.decode(bytes));
    });
  }
  it('a long ASCII text with one character beyond it at the end', () => {
    const bytes = Buffer.from('x'.repeat(100_000) + 'é');
    expect(decodeText(bytes)).toBe(utf8.decode(bytes));
  });
});
