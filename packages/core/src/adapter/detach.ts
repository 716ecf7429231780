/**
 * Plain JSON data (an adapter's facts) whose strings share nothing with the text they came
 * from. A name or a snippet a parser takes from a file is a slice of the file's text, and V8
 * keeps the whole text alive as long as the slice lives: facts kept for a run (one per distinct
 * blob) would keep every blob's text. Measured on a real TypeORM history of 522 versions: 0.97 GB
 * peak memory before, 0.47 GB after (DEVELOPERS.md).
 *
 * The data is changed in place (its arrays and objects are the parse's own, built for it) and
 * returned: every string of 13 characters or more is replaced by a copy (V8 copies shorter
 * substrings anyway, `SlicedString::kMinLength`), and, as a JSON round trip would, a property
 * whose value is `undefined` is removed and an `undefined` in an array becomes `null`. Walking the
 * data this way took a tenth of the time of `JSON.parse(JSON.stringify(value))`, which did the
 * same (DEVELOPERS.md, Performance).
 */
export function detach<T>(value: T): T {
  return value === undefined ? value : (copyStrings(value) as T);
}

/** A string's characters in a string of its own (a flattened concatenation, then a slice of that). */
function ownCopy(s: string): string {
  return (' ' + s).slice(1);
}

function copyStrings(v: unknown): unknown {
  if (typeof v === 'string') return v.length >= 13 ? ownCopy(v) : v;
  if (v === null || typeof v !== 'object') return v;
  if (Array.isArray(v)) {
    for (let i = 0; i < v.length; i++) {
      const x = v[i];
      if (x === undefined) v[i] = null;
      else if (typeof x === 'object' ? x !== null : typeof x === 'string' && x.length >= 13) v[i] = copyStrings(x);
    }
    return v;
  }
  const o = v as Record<string, unknown>;
  for (const k in o) {
    const x = o[k];
    if (x === undefined) delete o[k];
    else if (typeof x === 'object' ? x !== null : typeof x === 'string' && x.length >= 13) o[k] = copyStrings(x);
  }
  return v;
}
