/*
 * Brink's Web Push handlers, imported by the service worker (vite.config.ts, workbox.importScripts).
 * A push carries { title, body, path, tag } (server/src/push/pusher.ts): it is shown as a
 * notification, and tapping it opens that page of Brink (an open Brink window is reused).
 */
self.addEventListener('push', (event) => {
  let message;
  try {
    message = event.data ? event.data.json() : {};
  } catch {
    message = { body: event.data ? event.data.text() : '' };
  }
  const path = typeof message.path === 'string' && message.path.startsWith('/') && !message.path.startsWith('//') ? message.path : '/field';
  event.waitUntil(
    self.registration.showNotification(message.title || 'Brink', {
      body: message.body || '',
      tag: message.tag || undefined,
      renotify: Boolean(message.tag),
      requireInteraction: true,
      icon: '/icons/icon-192.png',
      data: { path },
    }),
  );
});

self.addEventListener('notificationclick', (event) => {
  event.notification.close();
  const path = (event.notification.data && event.notification.data.path) || '/field';
  const url = new URL(path, self.location.origin).href;
  event.waitUntil(
    (async () => {
      const windows = await self.clients.matchAll({ type: 'window', includeUncontrolled: true });
      for (const client of windows) {
        if (new URL(client.url).origin !== self.location.origin) continue;
        // Focus may be refused (no user gesture behind the event); the page still goes to the permit.
        await client.focus().catch(() => undefined);
        if ('navigate' in client) {
          const moved = await client.navigate(url).catch(() => null);
          if (moved) return moved;
        }
      }
      return self.clients.openWindow(url);
    })(),
  );
});
