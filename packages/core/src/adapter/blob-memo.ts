import type { TreeView } from './api.js';

/**
 * A value an adapter derives from the text of one file, computed once per blob id: the same
 * text always gives the same value, so a file unchanged across commits is read and derived
 * once for the whole run. Keep one memo per kind of value, at module level.
 *
 * ```ts
 * const imports = new BlobMemo<string[]>();
 * const specs = (await imports.of(tree, path, (text) => (text === undefined ? [] : scanImports(text)))) ?? [];
 * ```
 */
export class BlobMemo<T> {
  private readonly memo = new Map<string, T>();

  /**
   * The value for `path` at this tree: undefined when the path has no blob; else `derive` of its
   * text (undefined when the file is binary or unreadable) and blob id, computed once per blob.
   */
  async of(tree: TreeView, path: string, derive: (text: string | undefined, blob: string) => T): Promise<T | undefined> {
    const blob = tree.blob(path);
    if (!blob) return undefined;
    if (this.memo.has(blob)) return this.memo.get(blob);
    const value = derive(await tree.read(path), blob);
    this.memo.set(blob, value);
    return value;
  }
}
