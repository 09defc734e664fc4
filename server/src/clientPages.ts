/**
 * The built client's pages: which modules each page's first open loads (keys of Vite's manifest,
 * dist/client/.vite/manifest.json, relative to client/) and the addresses it opens at. Used by the
 * page shell (shell.ts: what index.html names in its head for an address), by `npm run bench` and by
 * client/src/app/bundle.test.ts (the budgets, bundleSize.ts).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';

const signedIn = 'src/app/Layout.tsx';
const site = 'src/app/SiteScope.tsx';
const auth = 'src/app/Layout.tsx'; // PublicLayout lives beside the signed-in frame

interface ClientPage {
  page: string;
  modules: string[];
  /** Modules the page loads by itself once it has shown: counted in its bytes, not named in the page shell. */
  later?: string[];
  /** The addresses the page opens at (none for a tool loaded on first use). */
  address?: RegExp;
  phone?: true;
  afterUse?: true;
}

/**
 * Every lazy route module must appear here (the bundle test checks), so a new page cannot escape the
 * budget; give it its address so that its first open fetches its code with the page (shell.ts).
 */
export const PAGES: ClientPage[] = [
  {
    page: '/field and /field/permits/:id (phone view)',
    modules: ['src/features/field/pages.ts'],
    // The map's code: counted; the shell names it in <meta name=brink-later> (fetched after the first scripts).
    later: ['src/features/field/components/ZoneMap.tsx'],
    address: /^\/field(\/permits\/\d+)?\/?$/,
    phone: true,
  },
  { page: '/sign-in', modules: [auth, 'src/features/auth/routes/SignInPage.tsx'], address: /^\/sign-in\/?$/ },
  { page: '/forgot-password', modules: [auth, 'src/features/auth/routes/ForgotPasswordPage.tsx'], address: /^\/forgot-password\/?$/ },
  { page: '/reset-password', modules: [auth, 'src/features/auth/routes/ResetPasswordPage.tsx'], address: /^\/reset-password\/?$/ },
  {
    page: '/invitations/accept',
    modules: [auth, 'src/features/auth/routes/AcceptInvitationPage.tsx'],
    address: /^\/invitations\/accept\/?$/,
  },
  {
    page: '/sites/:id (dashboard)',
    modules: [
      signedIn,
      site,
      'src/features/dashboard/routes/DashboardPage.tsx',
      'src/features/inspections/components/DuePanel.tsx',
      'src/features/permits/components/DashboardPermits.tsx',
    ],
    address: /^\/sites\/\d+\/?$/,
  },
  { page: '/sites/:id/map', modules: [signedIn, site, 'src/features/map/routes/SiteMapPage.tsx'], address: /^\/sites\/\d+\/map\/?$/ },
  // The drawing tools load when someone first draws or edits a shape: no first load, shown for reference.
  {
    page: '/sites/:id/map once drawing',
    modules: [signedIn, site, 'src/features/map/routes/SiteMapPage.tsx', 'src/features/map/components/DrawTools.tsx'],
    afterUse: true,
  },
  {
    page: '/sites/:id/register',
    modules: [signedIn, site, 'src/features/register/routes/RegisterPage.tsx'],
    address: /^\/sites\/\d+\/register\/?$/,
  },
  {
    page: '/sites/:id/permits',
    modules: [signedIn, site, 'src/features/permits/routes/PermitListPage.tsx'],
    address: /^\/sites\/\d+\/permits\/?$/,
  },
  {
    page: '/sites/:id/permits/new',
    modules: [signedIn, site, 'src/features/permits/routes/NewPermitPage.tsx'],
    address: /^\/sites\/\d+\/permits\/new\/?$/,
  },
  {
    page: '/sites/:id/inspections',
    modules: [signedIn, site, 'src/features/inspections/routes/InspectionsPage.tsx'],
    address: /^\/sites\/\d+\/inspections\/?$/,
  },
  {
    page: '/sites/:id/excavations/:id/inspect',
    modules: [signedIn, site, 'src/features/inspections/routes/InspectPage.tsx'],
    address: /^\/sites\/\d+\/excavations\/\d+\/inspect\/?$/,
  },
  {
    page: '/sites/:id/excavations/:id/inspections',
    modules: [signedIn, site, 'src/features/inspections/routes/HistoryPage.tsx'],
    address: /^\/sites\/\d+\/excavations\/\d+\/inspections\/?$/,
  },
  { page: '/permits/:id', modules: [signedIn, 'src/features/permits/routes/PermitPage.tsx'], address: /^\/permits\/\d+\/?$/ },
  {
    page: '/permits/:id/edit (placing)',
    modules: [signedIn, 'src/features/permits/routes/PermitEditPage.tsx'],
    address: /^\/permits\/\d+\/edit\/?$/,
  },
  { page: '/plant', modules: [signedIn, 'src/features/plant/routes/PlantPage.tsx'], address: /^\/plant\/?$/ },
  { page: '/admin/people', modules: [signedIn, 'src/features/admin/routes/PeoplePage.tsx'], address: /^\/admin\/people\/?$/ },
  { page: '/admin/sites', modules: [signedIn, 'src/features/admin/routes/SitesPage.tsx'], address: /^\/admin\/sites\/?$/ },
  {
    page: '/admin/sites/:id',
    modules: [signedIn, 'src/features/admin/routes/SiteEditPage.tsx'],
    address: /^\/admin\/sites\/(\d+|new)\/?$/,
  },
  { page: '/admin/mail', modules: [signedIn, 'src/features/admin/routes/MailPage.tsx'], address: /^\/admin\/mail\/?$/ },
];

interface ManifestChunk {
  file: string;
  isEntry?: boolean;
  isDynamicEntry?: boolean;
  imports?: string[];
  dynamicImports?: string[];
  css?: string[];
  assets?: string[];
}
type Manifest = Record<string, ManifestChunk>;

export function readManifest(dist: string): Manifest {
  return JSON.parse(readFileSync(join(dist, '.vite', 'manifest.json'), 'utf8')) as Manifest;
}

/** The files (scripts and their styles) that loading `keys` fetches: each module and everything it imports statically. */
export function moduleFiles(manifest: Manifest, keys: string[]): { scripts: string[]; styles: string[] } {
  const scripts = new Set<string>();
  const styles = new Set<string>();
  const visit = (key: string) => {
    const c = manifest[key];
    if (!c) throw new Error(`${key} is not in the build's manifest (renamed or no longer lazy?)`);
    if (scripts.has(c.file)) return;
    scripts.add(c.file);
    for (const s of c.css ?? []) styles.add(s);
    for (const i of c.imports ?? []) visit(i);
  };
  keys.forEach(visit);
  return { scripts: [...scripts], styles: [...styles] };
}

/** The manifest keys of the build's entry scripts (index.html's). */
export function entryModules(manifest: Manifest): string[] {
  return Object.entries(manifest)
    .filter(([, c]) => c.isEntry && c.file.endsWith('.js'))
    .map(([k]) => k);
}

/**
 * Every file the phone view needs to open with no signal, from the build's manifest: the entry's
 * scripts, styles and fonts, and the phone view's modules (PAGES: its pages and its map) with all
 * they import, statically or lazily, and their styles. The Latin Extended subsets of the fonts are
 * left out (fetched the first time a name with accents shows). What the service worker precaches
 * (vite.config.ts); desk-only pages are not in it.
 */
export function phoneFiles(manifest: Manifest): string[] {
  const entry = entryModules(manifest);
  const files = new Set<string>();
  const add = (c: ManifestChunk) => [c.file, ...(c.css ?? []), ...(c.assets ?? [])].forEach((f) => files.add(f));
  const shell = new Set<string>();
  const statically = (key: string) => {
    if (shell.has(key)) return;
    shell.add(key);
    add(manifest[key]);
    for (const i of manifest[key].imports ?? []) statically(i);
  };
  entry.forEach(statically);
  // From the phone view's own modules, lazy imports too (the map); never the entry's (every page).
  const seen = new Set<string>();
  const reach = (key: string) => {
    const c = manifest[key];
    if (!c) throw new Error(`${key} is not in the build's manifest (renamed or no longer lazy?)`);
    if (seen.has(key) || shell.has(key)) return;
    seen.add(key);
    add(c);
    for (const i of [...(c.imports ?? []), ...(c.dynamicImports ?? [])]) reach(i);
  };
  for (const p of PAGES.filter((page) => page.phone)) [...p.modules, ...(p.later ?? [])].forEach(reach);
  return [...files].filter((f) => !/-latin-ext-/.test(f)).sort();
}
