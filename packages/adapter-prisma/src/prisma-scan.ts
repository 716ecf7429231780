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
  line: number;
}

export interface ScannedBlock {
  keyword: 'model' | 'view' | 'enum' | 'type' | 'datasource' | 'generator';
  name: string;
  file: string;
  line: number;
  fields: ScannedField[];
  /** Block attributes (`@@...`), text. */
  blockAttributes: string[];
  /** For datasource/generator blocks: `key = value` properties (value as text). */
  properties: Map<string, { value: string; line: number }>;
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

export function scanSchema(file: string, text: string): ScannedBlock[] {
  const lines = text.split(/\r?\n/);
  const blocks: ScannedBlock[] = [];
  let cur: ScannedBlock | null = null;
  let openAt = 0;
  for (let i = 0; i < lines.length; i++) {
    const raw = lines[i]!;
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
        openAt = i;
      }
      continue;
    }
    if (CLOSE.test(raw)) {
      cur.text = lines.slice(openAt, i + 1).join('\n');
      blocks.push(cur);
      cur = null;
      continue;
    }
    const line = stripComment(raw).trim();
    if (!line) continue;
    if (cur.keyword === 'datasource' || cur.keyword === 'generator') {
      const p = PROPERTY.exec(line);
      if (p) cur.properties.set(p[1]!, { value: p[2]!, line: i + 1 });
      continue;
    }
    if (line.startsWith('@@')) {
      cur.blockAttributes.push(line);
      continue;
    }
    if (cur.keyword === 'enum') {
      const name = /^([A-Za-z_][\w]*)/.exec(line)?.[1];
      if (name) cur.fields.push({ name, type: '', list: false, optional: false, attributes: line.slice(name.length), line: i + 1 });
      continue;
    }
    const f = FIELD.exec(line);
    if (f) {
      cur.fields.push({ name: f[1]!, type: f[2]!, list: !!f[3], optional: !!f[4], attributes: (f[5] ?? '').trim(), line: i + 1 });
    }
  }
  return blocks;
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
