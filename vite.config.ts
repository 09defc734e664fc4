import { defineConfig } from 'vite';
import react from '@vitejs/plugin-react';
import tailwindcss from '@tailwindcss/vite';
import { VitePWA } from 'vite-plugin-pwa';
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Plugin } from 'vite';
import { phoneFiles, readManifest } from './server/src/clientPages.ts';

const here = (p: string) => fileURLToPath(new URL(p, import.meta.url));

export const alias = {
  '@client': here('./client/src'),
  '@server': here('./server/src'),
  '@shared': here('./shared'),
  '@db': here('./db'),
};

/**
 * A Workbox plugin for the field API's cache: an answer the service worker serves from its cache
 * carries the header X-Brink-Kept-Copy (KEPT_COPY_HEADER in client/src/features/field/api/kept.ts,
 * whose test checks the two agree), so the page never takes a kept copy for the server's answer.
 * Serialised into sw.js: the function refers to nothing outside itself.
 */
export const markKeptCopy = {
  cachedResponseWillBeUsed: async ({ cachedResponse }: { cachedResponse?: Response | null }) => {
    if (!cachedResponse) return cachedResponse;
    const headers = new Headers(cachedResponse.headers);
    headers.set('X-Brink-Kept-Copy', '1');
    return new Response(cachedResponse.body, { status: cachedResponse.status, statusText: cachedResponse.statusText, headers });
  },
};

/** The folder the build writes (the bundle test builds elsewhere): where phoneOnly reads the build's manifest. */
let outDir = here('./dist/client');
const outDirOf: Plugin = {
  name: 'brink-out-dir',
  configResolved(config) {
    outDir = resolve(config.root, config.build.outDir);
  },
};

/**
 * The precache holds what the phone view needs with no signal and nothing else (phoneFiles in
 * server/src/clientPages.ts, read from the build's manifest): on a first open on a weak signal the
 * worker fetched every page's code, some 570 KB, on the phone's line after the page had shown. Files
 * outside assets/ (index.html, the icons, the app manifest, push-sw.js) stay.
 */
const phoneOnly = <E extends { url: string }>(entries: E[]) => {
  const keep = new Set(phoneFiles(readManifest(outDir)));
  return { manifest: entries.filter((e) => !e.url.startsWith('assets/') || keep.has(e.url)), warnings: [] };
};

/**
 * The installable phone app and its service worker (client/src/features/field registers it; see
 * docs/phone-offline.md). The worker precaches the app shell, answers every page
 * address with index.html when there is no signal, and keeps the answers of the field view's API
 * calls: network first, the last good copy when the network fails or is too slow.
 */
const pwa = VitePWA({
  injectRegister: false,
  registerType: 'autoUpdate',
  filename: 'sw.js',
  manifestFilename: 'manifest.webmanifest',
  includeAssets: ['icons/icon.svg', 'icons/apple-touch-icon.png'],
  manifest: {
    id: '/field',
    name: 'Brink: permits and exclusion zones',
    short_name: 'Brink',
    description: 'The permits that name you, the exclusion zone around you, briefings and concerns, also with poor signal.',
    lang: 'en-GB',
    start_url: '/field',
    scope: '/',
    display: 'standalone',
    background_color: '#f7f5ef',
    theme_color: '#1e2a33',
    icons: [
      { src: '/icons/icon-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
      { src: '/icons/icon-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
      { src: '/icons/icon-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
      { src: '/icons/icon.svg', sizes: 'any', type: 'image/svg+xml', purpose: 'any' },
    ],
  },
  workbox: {
    // The phone view's shell: its scripts, styles and Latin fonts (phoneOnly), the page, the icons.
    globPatterns: ['**/*.{js,css,html,svg,png,webmanifest,woff2}'],
    manifestTransforms: [phoneOnly],
    maximumFileSizeToCacheInBytes: 4 * 1024 * 1024,
    navigateFallback: '/index.html',
    navigateFallbackDenylist: [/^\/api\//],
    cleanupOutdatedCaches: true,
    // Web Push: shows Brink's notifications and opens the permit when one is tapped (client/public/push-sw.js).
    importScripts: ['/push-sw.js'],
    clientsClaim: true,
    skipWaiting: true,
    runtimeCaching: [
      {
        // The field view's reads (my permits, one permit): the network when it answers within a few
        // seconds, else the last good copy, marked by markKeptCopy. Errors are never kept.
        urlPattern: ({ url, request }) => request.method === 'GET' && url.pathname.startsWith('/api/field/'),
        handler: 'NetworkFirst',
        options: {
          cacheName: 'brink-field-api',
          networkTimeoutSeconds: 8,
          cacheableResponse: { statuses: [200] },
          expiration: { maxEntries: 100, maxAgeSeconds: 14 * 24 * 3600 },
          plugins: [markKeptCopy],
        },
      },
      {
        // Stored files (concern photos, the site plan image) never change under the same id.
        urlPattern: ({ url, request }) => request.method === 'GET' && /^\/api\/uploads\/\d+$/.test(url.pathname),
        handler: 'CacheFirst',
        options: {
          cacheName: 'brink-field-files',
          cacheableResponse: { statuses: [200] },
          expiration: { maxEntries: 60, maxAgeSeconds: 14 * 24 * 3600 },
        },
      },
      {
        // The other pages' code, styles and fonts (not precached): kept once a page has fetched them;
        // their names change with their content.
        urlPattern: ({ url, request, sameOrigin }) => sameOrigin && request.method === 'GET' && url.pathname.startsWith('/assets/'),
        handler: 'CacheFirst',
        options: {
          cacheName: 'brink-pages',
          cacheableResponse: { statuses: [200] },
          expiration: { maxEntries: 150, maxAgeSeconds: 30 * 24 * 3600 },
        },
      },
    ],
  },
  devOptions: { enabled: false },
});

const REACT = /node_modules[\\/](react|react-dom|scheduler|react-router|react-router-dom|@tanstack[\\/](query-core|react-query))[\\/]/;

/**
 * The phone view's first open fetches its lazy pages (client/src/features/field/pages.ts) and the
 * modules of ours they import from elsewhere (lib/, components/, shared/). Left to itself the
 * bundler gives each of those shared modules its own 1-3 KB file, a dozen requests queued on
 * HTTP/1.1's six connections at 150 ms a round trip on a poor line; here they are one chunk,
 * 'phone-shared': every module of ours that pages.ts imports statically, directly or through others,
 * outside the phone view's own folder, except what the entry and the signed-in frame already load
 * and anything that needs a library besides React's (turf, zod: those stay where they were). Other
 * pages that use one of them load the whole chunk (a few KB more for them; bundle.test holds the
 * budgets).
 */
const phoneShared = new WeakMap<object, Set<string>>();
type Graph = { getModuleInfo(id: string): { importedIds: readonly string[] } | null };
function phoneChunk(id: string, ctx: Graph): string | null {
  let modules = phoneShared.get(ctx);
  if (!modules) {
    const imports = (m: string) => ctx.getModuleInfo(m)?.importedIds ?? [];
    const ownLibraries = (m: string) => imports(m).some((i) => i.includes('node_modules') && !REACT.test(i));
    const reach = (from: string, into = new Set<string>()) => {
      if (into.has(from) || from.includes('node_modules') || ownLibraries(from)) return into;
      into.add(from);
      for (const next of imports(from)) reach(next, into);
      return into;
    };
    const loaded = reach(here('./client/src/app/Layout.tsx'), reach(here('./client/src/main.tsx')));
    const field = here('./client/src/features/field/');
    modules = new Set([...reach(here('./client/src/features/field/pages.ts'))].filter((m) => !m.startsWith(field) && !loaded.has(m)));
    phoneShared.set(ctx, modules);
  }
  return modules.has(id) ? 'phone-shared' : null;
}

/**
 * The page's icon (client/public/icons/icon.svg) written into index.html as a data: address: the
 * browser asked for the file once the page had loaded, the last request on a phone's first open
 * (150 ms a round trip). The file stays for the app manifest and the service worker.
 */
const inlineIcon: Plugin = {
  name: 'brink-inline-icon',
  transformIndexHtml(html) {
    const svg = readFileSync(here('./client/public/icons/icon.svg'), 'utf8')
      .replace(/<!--[\s\S]*?-->/g, '')
      .replace(/\s+/g, ' ');
    if (!html.includes('href="/icons/icon.svg"')) throw new Error('index.html no longer names /icons/icon.svg as its icon');
    return html.replace('href="/icons/icon.svg"', `href="data:image/svg+xml,${encodeURIComponent(svg.trim())}"`);
  },
};

// Client build (root: client/). In development `npm run dev` proxies /api to the Express server.
export default defineConfig({
  root: here('./client'),
  plugins: [outDirOf, inlineIcon, react(), tailwindcss(), pwa],
  resolve: { alias },
  build: {
    outDir: here('./dist/client'),
    emptyOutDir: true,
    // dist/client/.vite/manifest.json: how the bench and the bundle test count each page's scripts.
    manifest: true,
    rolldownOptions: {
      output: {
        // Libraries every page (or every map) needs, each in one file: fewer requests on a slow
        // round trip, and one gzip stream compresses better than many small ones.
        codeSplitting: {
          groups: [
            {
              name: 'react',
              test: REACT,
            },
            { name: 'zod', test: /node_modules[\\/]zod[\\/]/ },
            { name: 'leaflet', test: /node_modules[\\/](leaflet|react-leaflet|@react-leaflet[\\/]core)[\\/]/ },
            { name: phoneChunk, test: /[\\/](client[\\/]src|shared)[\\/]/, includeDependenciesRecursively: false },
          ],
        },
      },
    },
  },
  server: {
    proxy: { '/api': `http://127.0.0.1:${process.env.PORT ?? 3000}` },
  },
});
