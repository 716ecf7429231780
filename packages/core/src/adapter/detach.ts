/**
 * A copy of plain JSON data (an adapter's facts) whose strings share nothing with the text they
 * came from. A name or a snippet a parser takes from a file is a slice of the file's text, and
 * V8 keeps the whole text alive as long as the slice lives: facts kept for a run (one per
 * distinct blob) would keep every blob's text. Measured on a real TypeORM history of 522
 * versions: 0.97 GB peak memory before, 0.47 GB after (DEVELOPERS.md).
 */
export function detach<T>(value: T): T {
  return value === undefined ? value : (JSON.parse(JSON.stringify(value)) as T);
}
