import type { RouteObject } from 'react-router-dom';

export { registerServiceWorker } from './offline/serviceWorker';

const pages = () => import('./pages');

/**
 * On a first open of the phone view, as soon as its first scripts have come: the line would sit idle
 * while the phone runs them (about a second at 4× slowdown), and only then fetch the fonts (asked
 * once text is drawn) and the map's code (fetched when the phone is idle, for a permit's map with no
 * signal). Both are fetched in that gap instead: the Latin files of the three weights the page shows
 * (`unicode-range` picks them, fonts.css) and the map's files, which the server's shell lists in
 * `<meta name="brink-later">` (server/src/shell.ts). The map's files are fetched and not run
 * (modulepreload), so running them does not delay the first screen: preloadZoneMap
 * (LazyZoneMap.tsx) still imports them once the phone is idle. main.tsx calls this once.
 */
export function startPhoneDownloads(): void {
  if (typeof window === 'undefined' || !/^\/field(\/|$)/.test(window.location.pathname)) return;
  for (const weight of [400, 600, 700]) void document.fonts?.load(`${weight} 1em "Source Sans 3"`).catch(() => undefined);
  const later = document.querySelector<HTMLMetaElement>('meta[name="brink-later"]')?.content.split(' ') ?? [];
  for (const href of later.filter(Boolean)) {
    const link = document.createElement('link');
    if (href.endsWith('.css')) Object.assign(link, { rel: 'preload', as: 'style' });
    else link.rel = 'modulepreload';
    link.href = href;
    link.crossOrigin = '';
    document.head.appendChild(link);
  }
}

/**
 * The phone view, under /field, with its own frame (it works with no signal, so it has its own sign-in
 * check). Its frame and both pages are one chunk (see pages.ts), which the service worker precaches.
 */
export const fieldRoutes: RouteObject[] = [
  {
    path: 'field',
    lazy: async () => ({ Component: (await pages()).FieldLayout }),
    children: [
      { index: true, lazy: async () => ({ Component: (await pages()).MyPermitsPage }) },
      { path: 'permits/:permitId', lazy: async () => ({ Component: (await pages()).FieldPermitPage }) },
    ],
  },
];
