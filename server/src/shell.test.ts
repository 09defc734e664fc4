import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { PAGES } from './clientPages';
import { pageShell } from './shell';

const html = '<!doctype html><html><head><script type="module" src="/assets/index-1.js"></script></head><body></body></html>';
const manifest = {
  'index.html': { file: 'assets/index-1.js', isEntry: true, imports: ['_react.js'], css: ['assets/index-1.css'] },
  '_react.js': { file: 'assets/react-1.js' },
  '_leaflet.js': { file: 'assets/leaflet-1.js', css: ['assets/leaflet-1.css'] },
  'src/features/field/pages.ts': { file: 'assets/pages-1.js', isDynamicEntry: true, imports: ['_react.js', '_leaflet.js'] },
  'src/features/field/components/ZoneMap.tsx': { file: 'assets/ZoneMap-1.js', isDynamicEntry: true, imports: ['_react.js', '_map.js'] },
  '_map.js': { file: 'assets/map-1.js', css: ['assets/map-1.css'] },
};
const dir = mkdtempSync(join(tmpdir(), 'brink-shell-'));
writeFileSync(join(dir, 'index.html'), html);
mkdirSync(join(dir, '.vite'));
writeFileSync(join(dir, '.vite', 'manifest.json'), JSON.stringify(manifest));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('the page shell', () => {
  const shell = pageShell(dir);

  it("names the phone view's scripts, styles and first reads in the head of /field", () => {
    const page = shell('/field');
    const head = page.slice(0, page.indexOf('</head>'));
    expect(head).toContain('<link rel="modulepreload" crossorigin href="/assets/pages-1.js">');
    expect(head).toContain('<link rel="modulepreload" crossorigin href="/assets/leaflet-1.js">');
    expect(head).toContain('<link rel="stylesheet" crossorigin href="/assets/leaflet-1.css">');
    expect(head).toContain('<link rel="preload" as="fetch" crossorigin="anonymous" href="/api/auth/me">');
    expect(head).toContain('<link rel="preload" as="fetch" crossorigin="anonymous" href="/api/field/permits">');
    expect(head).toContain('<link rel="preload" as="fetch" crossorigin="anonymous" href="/api/sites">');
    // The entry's own imports are already named by index.html.
    expect(head).not.toContain('react-1.js');
  });

  it("lists the phone view's map files for the page to fetch later, apart from the scripts it fetches at once", () => {
    const page = shell('/field');
    const head = page.slice(0, page.indexOf('</head>'));
    expect(head).toContain('<meta name="brink-later" content="/assets/ZoneMap-1.js /assets/map-1.js /assets/map-1.css">');
    expect(head).not.toContain('href="/assets/ZoneMap-1.js"');
    expect(head).not.toContain('href="/assets/map-1.js"');
    expect(shell('/field/permits/42')).toContain('<meta name="brink-later"');
    expect(shell('/no/such/page')).not.toContain('brink-later');
  });

  it('reads the permit a /field/permits/:id address names', () => {
    const page = shell('/field/permits/42');
    expect(page).toContain('href="/api/field/permits/42"');
    expect(page).not.toContain('href="/api/field/permits">');
    expect(page).toContain('href="/api/sites"');
  });

  it('adds only who is signed in for an address of no known page', () => {
    const page = shell('/no/such/page');
    expect(page).toContain('href="/api/auth/me"');
    expect(page).not.toContain('modulepreload');
    expect(page).not.toContain('href="/api/sites"');
  });
});

describe('the pages of the build', () => {
  it('each page opened at an address has one, and no two pages share an address', () => {
    const opened = PAGES.filter((p) => !p.afterUse);
    expect(opened.filter((p) => !p.address).map((p) => p.page)).toEqual([]);
    const examples = opened.map((p) => p.page.split(' ')[0].replace(/:id/g, '7'));
    examples.forEach((address, i) => {
      expect(opened.filter((p) => p.address?.test(address)).map((p) => p.page)).toEqual([opened[i].page]);
    });
  });
});
