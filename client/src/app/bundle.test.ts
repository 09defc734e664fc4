// @vitest-environment node
/**
 * The JavaScript budgets of issue 14, on a fresh production build: bytes are not noisy, so they are
 * asserted here (times are printed by `npm run bench`, never asserted). Builds the client into a
 * temporary folder (about 15 s of processor time).
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'vite';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
// eslint-disable-next-line import-x/no-restricted-paths -- the bundle budget is the build tool's (npm run bench), checked here on a real build
import { BUDGET, budgetOf, bundleReport, type BundleReport } from '@server/cli/bundleSize';
// eslint-disable-next-line import-x/no-restricted-paths -- the pages' modules in the build's manifest, as the page shell reads them
import { entryModules, moduleFiles, PAGES, readManifest } from '@server/clientPages';

const root = fileURLToPath(new URL('../../..', import.meta.url));
const out = mkdtempSync(join(tmpdir(), 'brink-bundle-'));
let report: BundleReport;

beforeAll(async () => {
  // vitest runs with NODE_ENV=test, which would make Vite bundle React's development build.
  const nodeEnv = process.env.NODE_ENV;
  process.env.NODE_ENV = 'production';
  try {
    await build({
      configFile: join(root, 'vite.config.ts'),
      mode: 'production',
      logLevel: 'silent',
      build: { outDir: out, emptyOutDir: true },
    });
  } finally {
    process.env.NODE_ENV = nodeEnv;
  }
  report = bundleReport(out);
}, 300_000);

afterAll(() => rmSync(out, { recursive: true, force: true }));

describe('JavaScript per page (gzip)', () => {
  it('counts every lazy page of the router', () => {
    expect(report.unlisted).toEqual([]);
  });

  it(`the phone view (/field and a permit on it) loads at most ${BUDGET.phone / 1000} KB in total`, () => {
    const phone = report.pages.filter((p) => p.phone);
    expect(phone.length).toBe(1);
    expect(phone[0].gzip).toBeLessThanOrEqual(BUDGET.phone);
  });

  it(`no page's first load is over ${BUDGET.page / 1000} KB`, () => {
    const over = report.pages.filter((p) => budgetOf(p) !== null && p.gzip > BUDGET.page).map((p) => `${p.page}: ${p.gzip} bytes`);
    expect(over).toEqual([]);
  });

  it('the phone view loads neither the drawing tools, nor turf, nor zod', () => {
    const phone = report.pages.find((p) => p.phone)!;
    const big = report.pages.find((p) => p.afterUse)!.files.filter((f) => !phone.files.includes(f));
    expect(big.length).toBeGreaterThan(0);
    expect(phone.files.filter((f) => /\/(DrawTools|zones|zod)-/.test(f))).toEqual([]);
  });
});

describe('the service worker precaches the phone view and not the desk pages', () => {
  // The worker's precache list as the built sw.js holds it.
  const precached = () => new Set([...readFileSync(join(out, 'sw.js'), 'utf8').matchAll(/\burl:"([^"]+)"/g)].map((m) => m[1]));
  const filesOf = (modules: string[]) => {
    const manifest = readManifest(out);
    const f = moduleFiles(manifest, [...entryModules(manifest), ...modules]);
    return [...f.scripts, ...f.styles];
  };
  const phone = PAGES.find((p) => p.phone)!;
  const phoneFiles = () => filesOf([...phone.modules, ...(phone.later ?? [])]);

  it('holds every script and style the phone view loads (its pages and its map), index.html and the Latin fonts', () => {
    const fonts = readdirSync(join(out, 'assets'))
      .filter((f) => /^source-sans-3-latin-\d+-normal-.*\.woff2$/.test(f))
      .map((f) => `assets/${f}`);
    expect(fonts.length).toBe(3);
    // The scripts index.html names outside the build's modules (public/locale-data.js).
    const named = [...readFileSync(join(out, 'index.html'), 'utf8').matchAll(/<script[^>]* src="\/([^"]+)"/g)].map((m) => m[1]);
    expect(named).toContain('locale-data.js');
    const wanted = [...phoneFiles(), ...fonts, ...named, 'index.html', 'manifest.webmanifest'];
    const list = precached();
    expect(wanted.filter((f) => !list.has(f))).toEqual([]);
  });

  it('holds none of the files only the desk pages load, nor the Latin Extended fonts', () => {
    const phoneSet = new Set(phoneFiles());
    const deskOnly = [...new Set(PAGES.filter((p) => !p.phone).flatMap((p) => filesOf(p.modules)))].filter((f) => !phoneSet.has(f));
    expect(deskOnly.length).toBeGreaterThan(10);
    const list = precached();
    expect([...deskOnly, ...[...list].filter((f) => f.includes('-latin-ext-'))].filter((f) => list.has(f))).toEqual([]);
  });
});
