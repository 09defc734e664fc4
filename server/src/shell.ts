/**
 * The page shell: the built client's index.html, with the first open's requests named in its head
 * for the address asked, so that the browser fetches them at once instead of one after another
 * (HTML → entry script → the page's lazy code → the page's data). For a known page
 * (`address` in clientPages.ts) it adds `<link rel=modulepreload>` for the page's scripts and
 * `<link rel=stylesheet>` for its styles; for every page a `<link rel=preload as=fetch>` for
 * who is signed in, and on the phone view the page's data. The browser's own fetches of the same
 * addresses then take the preloaded answers. A page's `later` code (the phone view's map) is listed
 * in `<meta name="brink-later">` for the page to fetch when its first scripts have come, not with
 * them. Without a build manifest the file is sent as it is.
 */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { entryModules, moduleFiles, PAGES, readManifest } from './clientPages';

/**
 * The API reads a page makes as soon as it opens (each page's own code asks them again and takes the
 * preloaded answer). The phone view also reads my sites (a figure's units follow the site unless I
 * chose mine: client/src/lib/units.ts), which it would otherwise ask only once who I am has come
 * back: one more round trip after the page has shown.
 */
function firstReads(address: string): string[] {
  const reads = ['/api/auth/me'];
  if (/^\/field\/?$/.test(address)) reads.push('/api/field/permits', '/api/sites');
  const permit = /^\/field\/permits\/(\d+)\/?$/.exec(address);
  if (permit) reads.push(`/api/field/permits/${permit[1]}`, '/api/sites');
  return reads;
}

/** Answers the shell's HTML for an address (memoised per page: the build does not change while the server runs). */
export function pageShell(clientDir: string): (address: string) => string {
  const html = readFileSync(join(clientDir, 'index.html'), 'utf8');
  const manifestFile = join(clientDir, '.vite', 'manifest.json');
  const manifest = existsSync(manifestFile) ? readManifest(clientDir) : null;
  const entry = manifest ? moduleFiles(manifest, entryModules(manifest)) : { scripts: [], styles: [] };
  const already = new Set([...entry.scripts, ...entry.styles]);
  const made = new Map<string, string>();
  return (address) => {
    const page = manifest ? PAGES.find((p) => p.address?.test(address)) : undefined;
    const reads = firstReads(address);
    const key = `${page?.page ?? ''}\n${reads.join('\n')}`;
    let out = made.get(key);
    if (out === undefined) {
      const files = page && manifest ? moduleFiles(manifest, page.modules) : { scripts: [], styles: [] };
      // Fetched by the page itself once its first scripts have come (startPhoneDownloads in client/src/features/field).
      const later = page?.later && manifest ? moduleFiles(manifest, page.later) : { scripts: [], styles: [] };
      const laterFiles = [...later.scripts, ...later.styles].filter((f) => !already.has(f) && !files.scripts.includes(f));
      const links = [
        ...(laterFiles.length ? [`<meta name="brink-later" content="${laterFiles.map((f) => `/${f}`).join(' ')}">`] : []),
        ...reads.map((r) => `<link rel="preload" as="fetch" crossorigin="anonymous" href="${r}">`),
        ...files.styles.filter((f) => !already.has(f)).map((f) => `<link rel="stylesheet" crossorigin href="/${f}">`),
        ...files.scripts.filter((f) => !already.has(f)).map((f) => `<link rel="modulepreload" crossorigin href="/${f}">`),
      ];
      out = html.replace('</head>', `${links.join('\n    ')}\n  </head>`);
      if (made.size < 200) made.set(key, out);
    }
    return out;
  };
}
