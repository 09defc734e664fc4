// @vitest-environment node
/**
 * The JavaScript budgets of issue 14, on a fresh production build: bytes are not noisy, so they are
 * asserted here (times are printed by `npm run bench`, never asserted). Builds the client into a
 * temporary folder (about 15 s of processor time).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'vite';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
// eslint-disable-next-line import-x/no-restricted-paths -- the bundle budget is the build tool's (npm run bench), checked here on a real build
import { BUDGET, budgetOf, bundleReport, type BundleReport } from '@server/cli/bundleSize';

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
