/**
 * A light line scanner of Prisma schema text. Prisma's engine is the authority on meaning;
 * this scanner only adds what the engine's data model leaves out: where each block and field
 * was declared, which blocks are views, and the models and fields marked `@@ignore` / `@ignore`
 * or typed `Unsupported(...)` (real database objects that the engine's data model drops).
 */

export interface ScannedField {
  name: string;
  /** Type name without modifiers, e.g. `String`, `Role`, `Unsupported("point")`. */
  type: string;
  list: boolean;
  optional: boolean;
  /** The attribute text after the type. */
  attributes: string;
  /** Lines after its block's opening line (its line is the block's `line` plus this). */
  offset: number;
}

export interface ScannedBlock {
  keyword: 'model' | 'view' | 'enum' | 'type' | 'datasource' | 'generator';
  name: string;
  file: string;
  line: number;
  fields: ScannedField[];
  /** Block attributes (`@@...`), text. */
  blockAttributes: string[];
  /** For datasource/generator blocks: `key = value` properties (value as text; offset as a field's). */
  properties: Map<string, { value: string; offset: number }>;
  /** The block's source text, from its opening line to its closing brace. */
  text: string;
}

const OPEN = /^\s*(model|view|enum|type|datasource|generator)\s+([A-Za-z_][\w]*)\s*\{\s*(\/\/.*)?$/;
const CLOSE = /^\s*\}\s*(\/\/.*)?$/;
const FIELD = /^\s*([A-Za-z_][\w]*)\s+(Unsupported\("(?:[^"\\]|\\.)*"\)|[A-Za-z_][\w.]*)(\[\])?(\?)?(.*)$/;
const PROPERTY = /^\s*([A-Za-z_][\w]*)\s*=\s*(.*?)\s*$/;

function stripComment(line: string): string {
  // remove a trailing `//` comment that is not inside a string
  let inString = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (ch === '\\' && inString) {
      i++;
      continue;
    }
    if (ch === '"') inString = !inString;
    if (!inString && ch === '/' && line[i + 1] === '/') return line.slice(0, i);
  }
  return line;
}

/** The line (1-based) of a field of a block. */
export function fieldLine(block: ScannedBlock, field: ScannedField): number {
  return block.line + field.offset;
}

export function scanSchema(file: string, text: string): ScannedBlock[] {
  return scanFile(file, text).blocks;
}

/** Where a scanned block lies in its file's text. */
interface Span {
  /** Offset of the block's opening line. */
  start: number;
  /** Offset of the line after the closing line (text length + 1 when the closing line is the last). */
  next: number;
  /** Index (0-based) of the line after the closing line. */
  nextLine: number;
}

/** One file's scan, kept so that the next version's text can be scanned from it. */
export interface FileScan {
  file: string;
  text: string;
  blocks: ScannedBlock[];
  spans: Span[];
}

/** Scan a whole file. */
export function scanFile(file: string, text: string): FileScan {
  const out: FileScan = { file, text, blocks: [], spans: [] };
  scanFrom(out, 0, 0);
  return out;
}

/**
 * Scan a file's text given the scan of an earlier text of the same file: the blocks in the part
 * the two texts share at their start are taken over as they are, those in the part they share
 * at their end with their lines moved, and only what lies between is scanned. The result is the
 * one `scanFile` gives (test/prisma/scan.test.ts).
 */
export function rescanFile(previous: FileScan, text: string): FileScan {
  const a = previous.text;
  if (a === text) return previous;
  const prefix = commonPrefix(a, text);
  const suffix = commonSuffix(a, text, Math.min(a.length, text.length) - prefix);
  const out: FileScan = { file: previous.file, text, blocks: [], spans: [] };
  let k = 0;
  while (k < previous.spans.length && previous.spans[k]!.next <= prefix) {
    out.blocks.push(previous.blocks[k]!);
    out.spans.push(previous.spans[k]!);
    k++;
  }
  const from = k > 0 ? previous.spans[k - 1]! : undefined;
  const sharedEnd = text.length - suffix;
  const shift = text.length - a.length;
  scanFrom(out, from?.next ?? 0, from?.nextLine ?? 0, (at, line) => {
    // at a line start outside any block, in the shared end (with the newline before it): the
    // earlier scan was outside a block at the same place if no block of it spans it
    if (at - 1 < sharedEnd) return false;
    const atPrev = at - shift;
    let j = k;
    while (j < previous.spans.length && previous.spans[j]!.start < atPrev) j++;
    if (j === previous.spans.length || (j > 0 && previous.spans[j - 1]!.next > atPrev)) return false;
    const first = previous.spans[j]!;
    const lineShift = line + countLines(text, at, first.start + shift) - (previous.blocks[j]!.line - 1);
    for (let i = j; i < previous.spans.length; i++) {
      const sp = previous.spans[i]!;
      out.blocks.push(lineShift === 0 ? previous.blocks[i]! : movedBlock(previous.blocks[i]!, lineShift));
      out.spans.push({ start: sp.start + shift, next: sp.next + shift, nextLine: sp.nextLine + lineShift });
    }
    return true;
  });
  return out;
}

function movedBlock(b: ScannedBlock, by: number): ScannedBlock {
  // fields and properties count their lines from the block's: they move with it
  return { ...b, line: b.line + by };
}

/** Newlines in `text` from `from` to `to`. */
function countLines(text: string, from: number, to: number): number {
  let n = 0;
  for (let i = text.indexOf('\n', from); i >= 0 && i < to; i = text.indexOf('\n', i + 1)) n++;
  return n;
}

const CHUNK = 2048;

function commonPrefix(a: string, b: string): number {
  const max = Math.min(a.length, b.length);
  let i = 0;
  // whole chunks first (string equality compares them natively), then character by character
  while (i + CHUNK <= max && a.slice(i, i + CHUNK) === b.slice(i, i + CHUNK)) i += CHUNK;
  while (i < max && a.charCodeAt(i) === b.charCodeAt(i)) i++;
  return i;
}

function commonSuffix(a: string, b: string, max: number): number {
  let n = 0;
  while (n + CHUNK <= max && a.slice(a.length - n - CHUNK, a.length - n) === b.slice(b.length - n - CHUNK, b.length - n)) n += CHUNK;
  while (n < max && a.charCodeAt(a.length - 1 - n) === b.charCodeAt(b.length - 1 - n)) n++;
  return n;
}

/**
 * Scan lines from offset `pos` (a line start, outside any block; `line0` its 0-based index) to
 * the end, adding to `out`. Lines are split as `split(/\r?\n/)` splits them. `jump`, asked at
 * every line start outside a block, may finish the scan itself (then it returns true).
 */
function scanFrom(out: FileScan, pos: number, line0: number, jump?: (at: number, line: number) => boolean): void {
  const { file, text } = out;
  const crlf = text.includes('\r');
  let cur: ScannedBlock | null = null;
  let openAt = 0;
  for (let i = line0; pos <= text.length; i++) {
    if (!cur && jump && jump(pos, i)) return;
    const nl = text.indexOf('\n', pos);
    const contentEnd = nl < 0 ? text.length : nl > pos && text.charCodeAt(nl - 1) === 13 ? nl - 1 : nl;
    const raw = text.slice(pos, contentEnd);
    const lineStart = pos;
    pos = nl < 0 ? text.length + 1 : nl + 1;
    if (!cur) {
      const m = OPEN.exec(raw);
      if (m) {
        cur = {
          keyword: m[1] as ScannedBlock['keyword'],
          name: m[2]!,
          file,
          line: i + 1,
          fields: [],
          blockAttributes: [],
          properties: new Map(),
          text: '',
        };
        openAt = lineStart;
      }
      continue;
    }
    if (CLOSE.test(raw)) {
      const body = text.slice(openAt, contentEnd);
      cur.text = crlf ? body.replace(/\r\n/g, '\n') : body;
      out.blocks.push(cur);
      out.spans.push({ start: openAt, next: pos, nextLine: i + 1 });
      cur = null;
      continue;
    }
    const line = stripComment(raw).trim();
    if (!line) continue;
    if (cur.keyword === 'datasource' || cur.keyword === 'generator') {
      const p = PROPERTY.exec(line);
      if (p) cur.properties.set(p[1]!, { value: p[2]!, offset: i + 1 - cur.line });
      continue;
    }
    if (line.startsWith('@@')) {
      cur.blockAttributes.push(line);
      continue;
    }
    if (cur.keyword === 'enum') {
      const name = /^([A-Za-z_][\w]*)/.exec(line)?.[1];
      if (name) cur.fields.push({ name, type: '', list: false, optional: false, attributes: line.slice(name.length), offset: i + 1 - cur.line });
      continue;
    }
    const f = FIELD.exec(line);
    if (f) {
      cur.fields.push({ name: f[1]!, type: f[2]!, list: !!f[3], optional: !!f[4], attributes: (f[5] ?? '').trim(), offset: i + 1 - cur.line });
    }
  }
}

/** Compiled patterns by attribute name and kind (names are few; each pattern is built once). */
const patterns = new Map<string, RegExp>();
function attributePattern(kind: 'string' | 'present' | 'open', name: string): RegExp {
  const key = `${kind}\u0000${name}`;
  let re = patterns.get(key);
  if (!re) {
    const n = name.replace(/[.@]/g, (c) => `\\${c}`);
    re = new RegExp(kind === 'string' ? `${n}\\(\\s*(?:name\\s*:\\s*)?"((?:[^"\\\\]|\\\\.)*)"` : kind === 'present' ? `${n}(?![\\w.])` : `${n}\\(`);
    patterns.set(key, re);
  }
  return re;
}

/** The first string argument of an attribute, e.g. `@map("x")` -> `x`. */
export function attributeString(attrs: string, name: string): string | undefined {
  return attributePattern('string', name).exec(attrs)?.[1];
}

/** Whether an attribute is present (`@id`, `@unique`, `@ignore`, ...), not as a prefix of a longer one. */
export function hasAttribute(attrs: string, name: string): boolean {
  return attributePattern('present', name).test(attrs);
}

/** The text inside the balanced parentheses of an attribute, e.g. `@default(now())` -> `now()`. */
export function attributeArgs(attrs: string, name: string): string | undefined {
  const at = attrs.search(attributePattern('open', name));
  if (at < 0) return undefined;
  let depth = 0;
  let inString = false;
  const start = attrs.indexOf('(', at);
  for (let i = start; i < attrs.length; i++) {
    const ch = attrs[i];
    if (inString) {
      if (ch === '\\') i++;
      else if (ch === '"') inString = false;
      continue;
    }
    if (ch === '"') inString = true;
    else if (ch === '(') depth++;
    else if (ch === ')') {
      depth--;
      if (depth === 0) return attrs.slice(start + 1, i);
    }
  }
  return undefined;
}

/** The `@db.Name(args)` attribute of a field, if any: `{ name: 'VarChar', args: ['200'] }`. */
export function dbAttribute(attrs: string): { name: string; args: string[] } | undefined {
  const m = /@db\.([A-Za-z]\w*)/.exec(attrs);
  if (!m) return undefined;
  const inner = attributeArgs(attrs.slice(m.index), `@db.${m[1]}`);
  const args = inner === undefined ? [] : inner.split(',').map((s) => s.trim()).filter(Boolean);
  return { name: m[1]!, args };
}

/** Field names of a block attribute list argument: `@@id([a, b])` -> `['a', 'b']`. */
export function listArgument(attr: string): string[] {
  const m = /\[([^\]]*)\]/.exec(attr);
  if (!m) return [];
  return m[1]!
    .split(',')
    .map((s) => s.trim().replace(/\(.*$/, ''))
    .filter(Boolean);
}
