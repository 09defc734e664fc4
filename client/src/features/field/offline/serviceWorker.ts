import { SIGNED_OUT_EVENT } from '@client/lib/session';
import { forgetCopies } from './store';
import { forgetPushSubscription } from './push';

/** The runtime caches the service worker keeps (vite.config.ts): forgotten on sign-out with the copies. */
const personalCaches = ['brink-field-api', 'brink-field-files'];

/**
 * Registers the service worker (built by vite-plugin-pwa as /sw.js) in production builds. It takes
 * over at once and updates itself when a new build is served; the page goes on working without it
 * (the field view also reads its IndexedDB copies).
 */
export function registerServiceWorker(): void {
  // On a shared phone, the next person must not see the last one's permits, even with no signal.
  if (typeof window !== 'undefined') window.addEventListener(SIGNED_OUT_EVENT, () => void forgetPersonalCopies());
  if (import.meta.env.MODE !== 'production' || typeof navigator === 'undefined' || !('serviceWorker' in navigator)) return;
  // Registered after the page has loaded, so the worker's precaching does not compete with the page's
  // own first downloads on a weak signal (the browser's own API: workbox-window's helper is not needed).
  const register = () =>
    navigator.serviceWorker.register('/sw.js', { scope: '/' }).catch(() => {
      // Not allowed here (plain http on a LAN address, private mode): the app works online as before.
    });
  if (document.readyState === 'complete') void register();
  else window.addEventListener('load', () => void register(), { once: true });
}

/** Forgets what was kept for the last person: their permit copies and the worker's cached answers. */
export async function forgetPersonalCopies(): Promise<void> {
  await forgetCopies().catch(() => undefined);
  await forgetPushSubscription();
  if (typeof caches !== 'undefined') await Promise.all(personalCaches.map((c) => caches.delete(c).catch(() => false)));
}
