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

/** Budgets of issue 14 (bytes, gzip; 1 KB = 1000 bytes, as the issue counts). */
export const BUDGET = {
  /** Everything the phone view (/field and a permit on it) loads. */
  phone: 200_000,
  /** Any page's first load. */
  page: 350_000,
} as const;

const signedIn = 'src/app/Layout.tsx';
const site = 'src/app/SiteScope.tsx';
const auth = 'src/app/Layout.tsx'; // PublicLayout lives beside the signed-in frame

/**
 * Pages by the module(s) their first open loads (keys of the manifest, relative to client/). Every
 * lazy route module must appear here (the test checks), so a new page cannot escape the budget.
 */
export const PAGES: { page: string; modules: string[]; phone?: true; afterUse?: true }[] = [
  { page: '/field and /field/permits/:id (phone view)', modules: ['src/features/field/pages.ts'], phone: true },
  { page: '/sign-in', modules: [auth, 'src/features/auth/routes/SignInPage.tsx'] },
  { page: '/forgot-password', modules: [auth, 'src/features/auth/routes/ForgotPasswordPage.tsx'] },
  { page: '/reset-password', modules: [auth, 'src/features/auth/routes/ResetPasswordPage.tsx'] },
  { page: '/invitations/accept', modules: [auth, 'src/features/auth/routes/AcceptInvitationPage.tsx'] },
  {
    page: '/sites/:id (dashboard)',
    modules: [
      signedIn,
      site,
      'src/features/dashboard/routes/DashboardPage.tsx',
      'src/features/inspections/components/DuePanel.tsx',
      'src/features/permits/components/DashboardPermits.tsx',
    ],
  },
  { page: '/sites/:id/map', modules: [signedIn, site, 'src/features/map/routes/SiteMapPage.tsx'] },
  // The drawing tools load when someone first draws or edits a shape: no first load, shown for reference.
  {
    page: '/sites/:id/map once drawing',
    modules: [signedIn, site, 'src/features/map/routes/SiteMapPage.tsx', 'src/features/map/components/DrawTools.tsx'],
    afterUse: true,
  },
  { page: '/sites/:id/register', modules: [signedIn, site, 'src/features/register/routes/RegisterPage.tsx'] },
  { page: '/sites/:id/permits', modules: [signedIn, site, 'src/features/permits/routes/PermitListPage.tsx'] },
  { page: '/sites/:id/permits/new', modules: [signedIn, site, 'src/features/permits/routes/NewPermitPage.tsx'] },
  { page: '/sites/:id/inspections', modules: [signedIn, site, 'src/features/inspections/routes/InspectionsPage.tsx'] },
  { page: '/sites/:id/excavations/:id/inspect', modules: [signedIn, site, 'src/features/inspections/routes/InspectPage.tsx'] },
  { page: '/sites/:id/excavations/:id/inspections', modules: [signedIn, site, 'src/features/inspections/routes/HistoryPage.tsx'] },
  { page: '/permits/:id', modules: [signedIn, 'src/features/permits/routes/PermitPage.tsx'] },
  { page: '/permits/:id/edit (placing)', modules: [signedIn, 'src/features/permits/routes/PermitEditPage.tsx'] },
  { page: '/plant', modules: [signedIn, 'src/features/plant/routes/PlantPage.tsx'] },
  { page: '/admin/people', modules: [signedIn, 'src/features/admin/routes/PeoplePage.tsx'] },
  { page: '/admin/sites', modules: [signedIn, 'src/features/admin/routes/SitesPage.tsx'] },
  { page: '/admin/sites/:id', modules: [signedIn, 'src/features/admin/routes/SiteEditPage.tsx'] },
  { page: '/admin/mail', modules: [signedIn, 'src/features/admin/routes/MailPage.tsx'] },
];

interface ManifestChunk {
  file: string;
  isEntry?: boolean;
  isDynamicEntry?: boolean;
  imports?: string[];
  dynamicImports?: string[];
}
type Manifest = Record<string, ManifestChunk>;

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

export function readManifest(dist: string): Manifest {
  return JSON.parse(readFileSync(join(dist, '.vite', 'manifest.json'), 'utf8')) as Manifest;
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
  const closure = (keys: string[]): Set<string> => {
    const seen = new Set<string>();
    const visit = (key: string) => {
      const c = manifest[key];
      if (!c) throw new Error(`${key} is not in the build's manifest (renamed or no longer lazy?)`);
      if (seen.has(c.file)) return;
      seen.add(c.file);
      for (const i of c.imports ?? []) visit(i);
    };
    keys.forEach(visit);
    return seen;
  };
  const entries = Object.entries(manifest)
    .filter(([, c]) => c.isEntry && c.file.endsWith('.js'))
    .map(([k]) => k);
  const pages = PAGES.map(({ page, modules, phone, afterUse }) => {
    const files = [...closure([...entries, ...modules])].filter((f) => f.endsWith('.js')).sort();
    return {
      page,
      phone: Boolean(phone),
      afterUse: Boolean(afterUse),
      files,
      raw: files.reduce((a, f) => a + size(f).raw, 0),
      gzip: files.reduce((a, f) => a + size(f).gzip, 0),
    };
  });
  const listed = new Set(PAGES.flatMap((p) => p.modules));
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
