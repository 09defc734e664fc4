import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { lockfileProblems } from './checkLockfile';

/** The offline dependency check (issue 12): what it refuses, and that the project's own files pass. */
const sha = 'sha512-' + 'A'.repeat(86) + '==';
const good = {
  lockfileVersion: 3,
  packages: {
    '': {},
    'node_modules/a': { version: '1.2.3', integrity: sha },
    'node_modules/esbuild': { version: '0.25.0', integrity: sha, hasInstallScript: true },
  },
};

describe('offline dependency check', () => {
  it('passes the project\u2019s own package.json and package-lock.json', () => {
    const manifest = JSON.parse(readFileSync('package.json', 'utf8'));
    const lock = JSON.parse(readFileSync('package-lock.json', 'utf8'));
    expect(lockfileProblems(manifest, lock)).toEqual([]);
  });

  it('passes a clean lockfile and names each problem of a bad one', () => {
    expect(lockfileProblems({ dependencies: { a: '1.2.3' } }, good)).toEqual([]);
    const bad = lockfileProblems(
      { dependencies: { a: '^1.2.3', b: 'github:someone/b' } },
      {
        lockfileVersion: 3,
        packages: {
          '': {},
          'node_modules/a': { version: '1.2.3' },
          'node_modules/b': { version: '1.0.0', integrity: sha, resolved: 'https://evil.example/b-1.0.0.tgz' },
          'node_modules/c': { version: '2.0.0', integrity: sha, hasInstallScript: true },
        },
      },
    );
    expect(bad).toEqual([
      'package.json dependencies: a is "^1.2.3", not an exact version (npm i -E a@<version>)',
      'package.json dependencies: b is "github:someone/b", not an exact version (npm i -E b@<version>)',
      'node_modules/a: no sha512 integrity hash',
      'node_modules/b: comes from https://evil.example/b-1.0.0.tgz, not the npm registry',
      'node_modules/c: runs an install script and is not on INSTALL_SCRIPTS_ALLOWED',
    ]);
    expect(lockfileProblems({}, { lockfileVersion: 1 })).toEqual(['package-lock.json: lockfileVersion 2 or 3 with "packages" is required']);
  });
});
