// The incremental scan of a schema file (rescanFile: blocks the old and the new text share at
// their start or end are taken over, lines moved) against a fresh scan of the new text, over
// seeded random chains of edits: lines inserted, removed and changed anywhere, braces and
// comments touched, blocks left open, CRLF line ends.
import { describe, expect, it } from 'vitest';
import { fieldLine, rescanFile, scanFile, scanSchema } from '../../packages/adapter-prisma/src/prisma-scan.js';
import { rng } from '../../bench/lib/rng.js';

const LINES = [
  'model Tool {', 'model Loan {', 'enum Kind {', 'view Due {', 'datasource db {', 'generator client {', '}', '} // end', '  }',
  '  id Int @id @default(autoincrement())', '  label String @db.VarChar(80)', '  note String? // "quoted } brace"',
  '  memberId Int', '  member Member @relation(fields: [memberId], references: [id])', '  @@map("tools")', '  @@unique([label, note])',
  '  provider = "postgresql"', '  url = env("DATABASE_URL")', '  DRILL', '  SAW @map("saw")', '', '// a comment', '  kind Kind @default(DRILL)',
];

function schema(r: () => number): string[] {
  const out: string[] = [];
  for (let b = 0; b < 6; b++) {
    out.push(LINES[Math.floor(r() * 6)]!);
    const n = 1 + Math.floor(r() * 6);
    for (let k = 0; k < n; k++) out.push(LINES[9 + Math.floor(r() * (LINES.length - 9))]!);
    out.push('}', '');
  }
  return out;
}

function edit(lines: string[], r: () => number): void {
  const at = Math.floor(r() * (lines.length + 1));
  const x = r();
  const line = LINES[Math.floor(r() * LINES.length)]!;
  if (x < 0.35) lines.splice(at, 0, line);
  else if (x < 0.6 && lines.length > 1) lines.splice(Math.min(at, lines.length - 1), 1);
  else if (x < 0.85 && lines.length > 0) lines[Math.min(at, lines.length - 1)] = line;
  else if (lines.length > 0) {
    // a change of one character inside a line
    const i = Math.min(at, lines.length - 1);
    const l = lines[i]!;
    const c = Math.floor(r() * (l.length + 1));
    lines[i] = l.slice(0, c) + ['x', ' ', '}', '{', '/', '"'][Math.floor(r() * 6)] + l.slice(c);
  }
}

describe('the incremental scan of a schema file', () => {
  for (const seed of [1, 2, 3, 4, 5, 6]) {
    it(`gives the fresh scan's blocks at every step of a chain of edits (seed ${seed})`, () => {
      const r = rng(seed);
      const lines = schema(r);
      const crlf = seed % 3 === 0;
      const render = (): string => lines.join(crlf ? '\r\n' : '\n') + (r() < 0.5 ? (crlf ? '\r\n' : '\n') : '');
      let scan = scanFile('prisma/schema.prisma', render());
      let reused = 0;
      for (let step = 0; step < 300; step++) {
        const edits = 1 + Math.floor(r() * 3);
        for (let e = 0; e < edits; e++) edit(lines, r);
        const text = render();
        const before = new Set(scan.blocks);
        scan = rescanFile(scan, text);
        for (const b of scan.blocks) if (before.has(b)) reused++;
        expect(scan).toEqual(scanFile('prisma/schema.prisma', text));
      }
      // the takeover happened (not only fresh scans)
      expect(reused).toBeGreaterThan(300);
    });
  }

  it('takes nothing over from a place that was not a line start before the edit', () => {
    // the new text is the old one without its first character: the old first line was no block
    const before = scanFile('s.prisma', 'xmodel A {\n  id Int @id\n}\nmodel B {\n  id Int @id\n}\n');
    expect(before.blocks.map((b) => b.name)).toEqual(['B']);
    const after = rescanFile(before, 'model A {\n  id Int @id\n}\nmodel B {\n  id Int @id\n}\n');
    expect(after.blocks.map((b) => [b.name, b.line])).toEqual([['A', 1], ['B', 4]]);
  });

  it('splits lines as the text would be split at CR LF and LF, and drops a block left open at the end', () => {
    const text = 'model A {\r\n  id Int @id\r\n}\r\nmodel B {\n  id Int @id\n';
    const blocks = scanSchema('s.prisma', text);
    expect(blocks.map((b) => [b.name, b.line, b.text])).toEqual([['A', 1, 'model A {\n  id Int @id\n}']]);
    expect(blocks[0]!.fields.map((f) => [f.name, fieldLine(blocks[0]!, f)])).toEqual([['id', 2]]);
  });
});
