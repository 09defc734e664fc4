/**
 * JavaScript each page of the built client makes a browser download on its first open, from Vite's
 * manifest (dist/client/.vite/manifest.json): the entry's scripts, the page's lazy route module and
 * everything those import statically, plus the chunks the page itself loads at once when it renders
 * (e.g. the dashboard's panels). Sizes are gzip (zlib level 6, as `gzip` and most servers send).
 * Used by `npm run bench` (web part) and client/src/app/bundle.test.ts (the budgets).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { entryModules, moduleFiles, PAGES, readManifest } from '../clientPages';

/** Budgets of issue 14 (bytes, gzip; 1 KB = 1000 bytes, as the issue counts). */
export const BUDGET = {
  /** Everything the phone view (/field and a permit on it) loads. */
  phone: 200_000,
  /** Any page's first load. */
  page: 350_000,
} as const;

export interface PageBytes {
  page: string;
  phone: boolean;
  /** Loaded on first use of a tool, not on the page's first open (no budget). */
  afterUse: boolean;
  files: string[];
  raw: number;
  gzip: number;
}

export interface BundleReport {
  pages: PageBytes[];
  /** All JavaScript of the build (what one script used to be). */
  total: { files: number; raw: number; gzip: number };
  /** Lazy route modules that no entry of PAGES names (should be none). */
  unlisted: string[];
}

/** Bytes per page of the client built in `dist` (default dist/client). */
export function bundleReport(dist: string): BundleReport {
  const manifest = readManifest(dist);
  const sizes = new Map<string, { raw: number; gzip: number }>();
  const size = (file: string) => {
    let s = sizes.get(file);
    if (!s) {
      const buf = readFileSync(join(dist, file));
      s = { raw: buf.length, gzip: gzipSync(buf, { level: 6 }).length };
      sizes.set(file, s);
    }
    return s;
  };
  const entries = entryModules(manifest);
  const pages = PAGES.map(({ page, modules, later, phone, afterUse }) => {
    const files = moduleFiles(manifest, [...entries, ...modules, ...(later ?? [])]).scripts.sort();
    return {
      page,
      phone: Boolean(phone),
      afterUse: Boolean(afterUse),
      files,
      raw: files.reduce((a, f) => a + size(f).raw, 0),
      gzip: files.reduce((a, f) => a + size(f).gzip, 0),
    };
  });
  const listed = new Set(PAGES.flatMap((p) => [...p.modules, ...(p.later ?? [])]));
  const unlisted = Object.entries(manifest)
    .filter(
      ([k, c]) => c.isDynamicEntry && (k.includes('/routes/') || k.endsWith('/pages.ts') || k.startsWith('src/app/')) && !listed.has(k),
    )
    .map(([k]) => k);
  const all = [...new Set(Object.values(manifest).map((c) => c.file))].filter((f) => f.endsWith('.js'));
  return {
    pages,
    total: { files: all.length, raw: all.reduce((a, f) => a + size(f).raw, 0), gzip: all.reduce((a, f) => a + size(f).gzip, 0) },
    unlisted,
  };
}

export const kb = (n: number) => `${(n / 1000).toFixed(1)} KB`;

/** The budget a page is held to, or null (loaded on first use of a tool). */
export const budgetOf = (p: PageBytes): number | null => (p.afterUse ? null : p.phone ? BUDGET.phone : BUDGET.page);

// `npx tsx server/src/cli/bundleSize.ts [dist]`: the table alone.
if (import.meta.url === `file://${process.argv[1]}`) {
  const r = bundleReport(process.argv[2] ?? 'dist/client');
  for (const p of r.pages) {
    const budget = budgetOf(p);
    const verdict = budget === null ? '(first use, no budget)' : `budget ${kb(budget)}  ${p.gzip <= budget ? 'meets' : 'MISSES'}`;
    console.log(`${p.page.padEnd(46)} ${kb(p.gzip).padStart(10)} gzip ${kb(p.raw).padStart(10)} raw  ${verdict}`);
  }
  console.log(`all JavaScript: ${r.total.files} files, ${kb(r.total.raw)} raw, ${kb(r.total.gzip)} gzip`);
  if (r.unlisted.length) console.log(`pages not in the table: ${r.unlisted.join(', ')}`);
}
