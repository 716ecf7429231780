/**
 * Paths of package.json files, as adapters that follow a repository's own packages (workspace
 * packages) read them.
 */

/** Whether a path is a package.json of the repository's own: not one under node_modules. */
export function isOwnPackageJson(path: string): boolean {
  return (path === 'package.json' || path.endsWith('/package.json')) && !path.includes('node_modules/');
}

/** The directory of a package.json's path ('' for the one at the root). */
export function packageJsonDir(path: string): string {
  return path === 'package.json' ? '' : path.slice(0, -'/package.json'.length);
}
