import { describe, expect, it } from 'vitest';
import { isOwnPackageJson, packageJsonDir } from '../../src/adapter/package-json.js';

describe('package.json paths', () => {
  it('are the repository\'s own outside node_modules only', () => {
    expect(isOwnPackageJson('package.json')).toBe(true);
    expect(isOwnPackageJson('packages/names/package.json')).toBe(true);
    expect(isOwnPackageJson('node_modules/knex/package.json')).toBe(false);
    expect(isOwnPackageJson('packages/names/node_modules/lodash/package.json')).toBe(false);
    expect(isOwnPackageJson('packages/names/my-package.json')).toBe(false);
    expect(isOwnPackageJson('package.json.bak')).toBe(false);
  });

  it('give their directory, the root as the empty string', () => {
    expect(packageJsonDir('package.json')).toBe('');
    expect(packageJsonDir('packages/names/package.json')).toBe('packages/names');
  });
});
