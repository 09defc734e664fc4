/**
 * The dependency check that works offline (issue 12): `npm audit` needs the registry's advisory
 * endpoint, which is not reachable everywhere (here it answers 405), and no advisory database ships
 * with npm. What can be checked against package.json and package-lock.json alone, it checks:
 *
 * - every direct dependency is pinned to an exact version (`npm i -E`), never a range, a Git URL, a
 *   tarball address or a local path;
 * - every package in the lockfile has an exact version and a sha512 integrity hash (npm verifies
 *   each download against it), and, where the lockfile records where it came from, that is the npm
 *   registry over HTTPS (packages bundled inside another are covered by their parent's hash);
 * - only packages on the list below run install scripts (a new one must be looked at and added).
 *
 * It cannot say whether a pinned version has a published vulnerability: that needs `npm audit` where
 * the registry allows it (README, Security). Run: `npm run audit:offline`.
 */
import { readFileSync } from 'node:fs';
import { pathToFileURL } from 'node:url';

/** Packages allowed to run install scripts, each looked at: esbuild fetches its platform binary. */
export const INSTALL_SCRIPTS_ALLOWED = ['esbuild'];

interface LockEntry {
  version?: string;
  resolved?: string;
  integrity?: string;
  link?: boolean;
  inBundle?: boolean;
  hasInstallScript?: boolean;
}
interface Lock {
  lockfileVersion?: number;
  packages?: Record<string, LockEntry>;
}
interface Manifest {
  dependencies?: Record<string, string>;
  devDependencies?: Record<string, string>;
}

const EXACT = /^\d+\.\d+\.\d+(-[0-9A-Za-z.-]+)?(\+[0-9A-Za-z.-]+)?$/;

/** What is wrong with the manifest and lockfile, one line each (empty when all is well). */
export function lockfileProblems(manifest: Manifest, lock: Lock): string[] {
  const out: string[] = [];
  if ((lock.lockfileVersion ?? 0) < 2 || !lock.packages) out.push('package-lock.json: lockfileVersion 2 or 3 with "packages" is required');
  for (const [kind, deps] of [
    ['dependencies', manifest.dependencies],
    ['devDependencies', manifest.devDependencies],
  ] as const) {
    for (const [name, spec] of Object.entries(deps ?? {})) {
      if (!EXACT.test(spec)) out.push(`package.json ${kind}: ${name} is "${spec}", not an exact version (npm i -E ${name}@<version>)`);
    }
  }
  for (const [where, e] of Object.entries(lock.packages ?? {})) {
    if (where === '' || e.link) continue;
    const name = where.replace(/^.*node_modules\//, '');
    if (!e.version || !EXACT.test(e.version)) out.push(`${where}: version ${JSON.stringify(e.version)} is not an exact registry version`);
    if (e.resolved && !e.resolved.startsWith('https://registry.npmjs.org/'))
      out.push(`${where}: comes from ${e.resolved}, not the npm registry`);
    if (!e.inBundle && !e.integrity?.startsWith('sha512-')) out.push(`${where}: no sha512 integrity hash`);
    if (e.hasInstallScript && !INSTALL_SCRIPTS_ALLOWED.includes(name))
      out.push(`${where}: runs an install script and is not on INSTALL_SCRIPTS_ALLOWED`);
  }
  return out;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const manifest = JSON.parse(readFileSync('package.json', 'utf8')) as Manifest;
  const lock = JSON.parse(readFileSync('package-lock.json', 'utf8')) as Lock;
  const problems = lockfileProblems(manifest, lock);
  const count = Object.keys(lock.packages ?? {}).length - 1;
  if (problems.length) {
    console.error(
      `Dependency check: ${problems.length} problem(s) in ${count} locked packages:\n${problems.map((p) => `- ${p}`).join('\n')}`,
    );
    process.exit(1);
  }
  console.log(
    `Dependency check: ${count} locked packages pinned with sha512 hashes; install scripts only from ${INSTALL_SCRIPTS_ALLOWED.join(', ')}. (Known vulnerabilities need \`npm audit\`, online.)`,
  );
}
