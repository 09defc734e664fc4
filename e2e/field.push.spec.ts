import { expect, test, type BrowserContext, type Page, type Worker } from '@playwright/test';
import { apiAs, ok, signIn, trenchWithLivePermit } from './helpers';

// On a phone: the operator turns on "Notifications on this phone". The browser's push service is
// the local fake one (PUSH_FAKE_SERVICE_URL, started by docker-less-scripts/test.sh): the page's own
// code subscribes, the subscription comes from the fake service. When the coordinator suspends a
// permit naming the operator, the fake service receives Brink's encrypted notification; handed to
// the phone's service worker as a push, it is shown, and tapping it opens the permit.

const fakeUrl = process.env.PUSH_FAKE_SERVICE_URL;

/** The parts of a service worker's global scope the test uses (the WebWorker types are not in this project's lib). */
type EventClass = new (type: string, init: object) => Event;
interface WorkerScope {
  registration: { getNotifications(): Promise<{ title: string; body: string; data: unknown }[]> };
  dispatchEvent(e: Event): boolean;
  NotificationEvent: EventClass;
}

async function fake<T>(path: string, body: unknown): Promise<T> {
  const r = await fetch(`${fakeUrl}${path}`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify(body),
  });
  expect(r.ok, `${path}: ${r.status}`).toBe(true);
  return ((await r.json()) as { data: T }).data;
}

/** The page's PushManager hands out this subscription (as if from the browser's push service). */
async function subscribeAt(page: Page, sub: { endpoint: string; keys: { p256dh: string; auth: string } }) {
  await page.addInitScript((sub) => {
    let current: PushSubscription | null = null;
    const make = () =>
      ({
        endpoint: sub.endpoint,
        expirationTime: null,
        options: {},
        getKey: () => null,
        toJSON: () => ({ endpoint: sub.endpoint, expirationTime: null, keys: sub.keys }),
        unsubscribe: async () => ((current = null), true),
      }) as unknown as PushSubscription;
    PushManager.prototype.subscribe = async function () {
      current = make();
      return current;
    };
    PushManager.prototype.getSubscription = async function () {
      return current;
    };
  }, sub);
}

/** Opens /field and reloads once its service worker runs (the switch needs it). */
async function openPhoneView(page: Page, context: BrowserContext): Promise<void> {
  await page.goto('/field');
  if (context.serviceWorkers().length === 0) await context.waitForEvent('serviceworker');
  await page.evaluate(() => navigator.serviceWorker.ready.then(() => true));
  await page.reload();
}

/**
 * Delivers `data` as a push message to the origin's service worker, as the browser does for one from its
 * push service, and waits until the worker has handled it: the browser's own record of the push
 * (DevTools' background-service log) says it completed. Answers that record, each line an event.
 *
 * Why wait: reading the notifications while the worker is still showing one can lose it. Chromium's
 * getNotifications() deletes the stored notifications it does not find on display at that moment
 * (PlatformNotificationContextImpl, "remove notifications that are not actually on display anymore"),
 * and one written between those two reads is such a notification. Polling at once failed so now and then
 * on a busy machine (once in CI; once in 48 phone tests here, under load), the push itself "completed:
 * Success" and no notification left to find.
 */
async function deliverPush(page: Page, origin: string, data: string): Promise<string[]> {
  const cdp = await page.context().newCDPSession(page);
  const registrationId = new Promise<string>((resolve) =>
    cdp.on('ServiceWorker.workerRegistrationUpdated', ({ registrations }) => {
      const ours = registrations.find((r) => r.scopeURL.startsWith(origin) && !r.isDeleted);
      if (ours) resolve(ours.registrationId);
    }),
  );
  const record: string[] = [];
  const completed = new Promise<void>((resolve) =>
    cdp.on('BackgroundService.backgroundServiceEventReceived', ({ backgroundServiceEvent: e }) => {
      record.push(`${e.eventName}: ${e.eventMetadata.map((m) => `${m.key}=${m.value}`).join(', ')}`);
      if (e.eventName === 'Push event completed') resolve();
    }),
  );
  await cdp.send('BackgroundService.setRecording', { shouldRecord: true, service: 'pushMessaging' });
  await cdp.send('BackgroundService.startObserving', { service: 'pushMessaging' });
  await cdp.send('ServiceWorker.enable');
  await cdp.send('ServiceWorker.deliverPushMessage', { origin, registrationId: await registrationId, data });
  await completed;
  await cdp.detach();
  return record;
}

/** The service worker running now (Chromium stops an idle one; a push starts it again as a new worker). */
async function runningWorker(context: BrowserContext): Promise<Worker> {
  return context.serviceWorkers().at(-1) ?? (await context.waitForEvent('serviceworker'));
}

test('the operator is told on the phone when a permit that names them is suspended, and the notification opens it', async ({
  page,
  context,
  playwright,
  baseURL,
}) => {
  expect(fakeUrl, 'PUSH_FAKE_SERVICE_URL (set by docker-less-scripts/test.sh)').toBeTruthy();
  const origin = new URL(baseURL!).origin;
  await context.grantPermissions(['notifications'], { origin });
  const siteId = await signIn(page, 'operator@demo.brink.test');
  const me = await ok<{ user: { id: number } }>(await page.request.get('/api/auth/me'), 'me');

  // The device's subscription at the fake push service, made with Brink's public key; the page's
  // PushManager hands it out when the phone view subscribes.
  const { publicKey } = await ok<{ publicKey: string }>(await page.request.get('/api/push/key'), 'push key');
  const device = await fake<{ endpoint: string; keys: { p256dh: string; auth: string }; clientHash: string }>('/subscribe', {
    userVisibleOnly: 'true',
    applicationServerKey: publicKey,
  });
  await subscribeAt(page, { endpoint: device.endpoint, keys: device.keys });

  // The service worker is installed once the phone view has loaded; the switch is usable then.
  await openPhoneView(page, context);
  const toggle = page.getByRole('checkbox', { name: 'Notifications on this phone' });
  await expect(toggle).toBeEnabled();
  await toggle.click();
  await expect(toggle)
    .toBeChecked()
    .catch(async (e: unknown) => {
      // Seen once in 50 runs under heavy load: the switch stayed off with no error shown, which the
      // page does when the browser answers the permission request "default". Say what it answered.
      const permission = await page.evaluate(async () => ({
        notification: Notification.permission,
        query: (await navigator.permissions.query({ name: 'notifications' })).state,
      }));
      await test.info().attach('notification permission after the click', { body: JSON.stringify(permission) });
      throw e;
    });
  await expect(page.getByText(/^On: this phone is told when a permit that names you/)).toBeVisible();

  // A permit naming the operator goes live (briefed) and is then suspended by the coordinator.
  const coordinator = await apiAs(playwright.request, baseURL!, 'coordinator@demo.brink.test');
  const supervisor = await apiAs(playwright.request, baseURL!, 'supervisor@demo.brink.test');
  const { permit } = await trenchWithLivePermit(supervisor, coordinator, siteId, [me.user.id], 90);
  const operator = await apiAs(playwright.request, baseURL!, null, await context.storageState());
  const briefed = await ok<{ briefing: { status: string } }>(await operator.post(`/api/permits/${permit.id}/briefing`), 'briefing');
  expect(briefed.briefing.status).toBe('live');
  const detail = await ok<{ permit: { version: number } }>(await coordinator.get(`/api/permits/${permit.id}`), 'permit');
  await ok(
    await coordinator.post(`/api/permits/${permit.id}/transitions`, {
      data: { action: 'suspend', version: detail.permit.version, reason: 'Water in the trench' },
    }),
    'suspend',
  );
  await Promise.all([coordinator.dispose(), supervisor.dispose(), operator.dispose()]);

  // The fake push service received (and decrypted) Brink's notification of the suspension.
  const title = `Permit ${permit.number} is suspended`;
  let payload = '';
  await expect
    .poll(
      async () => {
        const { messages } = await fake<{ messages: string[] }>('/get-notifications', { clientHash: device.clientHash });
        payload = messages.find((m) => (JSON.parse(m) as { title: string }).title === title) ?? '';
        return payload !== '';
      },
      { timeout: 20_000 },
    )
    .toBe(true);
  expect(JSON.parse(payload)).toMatchObject({
    path: `/field/permits/${permit.id}`,
    body: 'Stop work under this permit now and move clear of the excavation.',
  });

  // Handed to the phone's service worker as the push it is, through the browser's own push path
  // (DevTools' deliverPushMessage: a trusted push event, which starts the worker again should the
  // browser have stopped it while idle): shown as a notification…
  const handled = await deliverPush(page, origin, payload);
  expect(handled.at(-1), handled.join('\n')).toBe('Push event completed: Status=Success');
  const shown = () =>
    page.evaluate(async (t) => {
      const list = await (await navigator.serviceWorker.ready).getNotifications();
      return list.filter((n) => n.title === t).map((n) => ({ body: n.body, data: n.data as { path: string } }));
    }, title);
  expect(await shown()).toEqual([
    { body: 'Stop work under this permit now and move clear of the excavation.', data: { path: `/field/permits/${permit.id}` } },
  ]);

  // …and tapping it opens the permit on the phone (the click is handed to the worker running now).
  await (
    await runningWorker(context)
  ).evaluate(async (t) => {
    const scope = self as unknown as WorkerScope;
    const [n] = (await scope.registration.getNotifications()).filter((x) => x.title === t);
    scope.dispatchEvent(new scope.NotificationEvent('notificationclick', { notification: n }));
  }, title);
  await expect(page).toHaveURL(new RegExp(`/field/permits/${permit.id}$`));
  await expect(page.getByText('Suspended').first()).toBeVisible();
});

test('a push address Brink will not send to is refused in words, and the switch stays off', async ({ page, context, baseURL }) => {
  await context.grantPermissions(['notifications'], { origin: new URL(baseURL!).origin });
  await signIn(page, 'operator@demo.brink.test');
  // A browser whose push service is none Brink sends to (nor the local fake one).
  await subscribeAt(page, { endpoint: 'https://push.example.invalid/device-1', keys: { p256dh: 'BPk3', auth: 'a1b2' } });
  await openPhoneView(page, context);
  const toggle = page.getByRole('checkbox', { name: 'Notifications on this phone' });
  await expect(toggle).toBeEnabled();
  await toggle.click();
  const problem =
    'Notifications were not turned on. This phone’s push service is not a known browser push service. ' +
    'Use Chrome, Edge, Firefox or Safari, whose push services Brink sends to, or tell the supervisor.';
  await expect(page.getByRole('alert').filter({ hasText: 'Notifications were not turned on' })).toHaveText(problem);
  await expect(page.getByText('not a known browser push service')).toHaveCount(1);
  await expect(toggle).not.toBeChecked();
  await expect(toggle).toHaveAccessibleDescription(problem);
});
