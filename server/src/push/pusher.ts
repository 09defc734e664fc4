import { randomUUID } from 'node:crypto';
import type PgBoss from 'pg-boss';
import webpush from 'web-push';
import type { Db } from '@db/database';
import type { Config } from '../config';
import { queueConnection } from '../services/tx';
import { drainingWorker, scheduledQueue } from '../jobs/queues';
import type { VapidKeys } from './keys';

/** What a notification says, and the page of Brink it opens (a path, e.g. /field/permits/12). */
interface PushMessage {
  title: string;
  body: string;
  path: string;
  /** Notifications with the same tag replace each other on the device (one per permit). */
  tag: string;
}

interface PushJob {
  key: string;
  subscriptionId: number;
  message: PushMessage;
}

/** Retries as the mail queue does (1 s, doubling), fewer: a notification a day late helps nobody. */
const PUSH_QUEUE_OPTIONS = { retryLimit: 12, retryDelay: 1, retryBackoff: true, expireInSeconds: 30 } as const;

/**
 * The push services real browsers subscribe at (their endpoints' hosts). A subscription naming any
 * other host is refused, so Brink never posts to an address a user typed in; the local fake push
 * service (PUSH_FAKE_SERVICE_URL) is allowed besides these.
 */
const PUSH_SERVICE_HOSTS = [
  /^fcm\.googleapis\.com$/,
  /^updates\.push\.services\.mozilla\.com$/,
  /(^|\.)push\.apple\.com$/,
  /(^|\.)notify\.windows\.com$/,
];

/** Why an endpoint is refused, or null when Brink may send to it. */
export function endpointProblem(endpoint: string, config: Pick<Config, 'push'>): string | null {
  let url: URL;
  try {
    url = new URL(endpoint);
  } catch {
    return 'is not an address';
  }
  const fake = config.push.fakeServiceUrl;
  if (fake && url.origin === new URL(fake).origin) return null;
  if (url.protocol !== 'https:') return 'must be an https address of a browser push service';
  if (!PUSH_SERVICE_HOSTS.some((h) => h.test(url.hostname))) return 'is not a known browser push service';
  return null;
}

/**
 * Web Push notifications, as a transactional outbox like the mail (mail/mailer.ts): `notify(db,
 * userIds, message)` queues one job per device of those people through `db`, so given the
 * transaction of the change that causes it the notification exists if and only if the change
 * committed. A worker sends each with the VAPID keys and retries while the push service fails;
 * a subscription the push service says is gone (404, 410) is removed. Each job's key is recorded
 * in `push_deliveries` when the push service has taken it: a job delivered again sends nothing.
 */
export class Pusher {
  constructor(
    private readonly boss: PgBoss,
    private readonly db: Db,
    private readonly config: Config,
    readonly queue: string,
    readonly keys: VapidKeys,
  ) {}

  async start(): Promise<void> {
    await scheduledQueue({ boss: this.boss }, this.queue, null, PUSH_QUEUE_OPTIONS);
    await drainingWorker<PushJob>(this.boss, this.queue, (job) => this.deliver(job));
  }

  /** Queues `message` for every device of these people through `db` (pass the change's transaction). Returns how many. */
  async notify(db: Db, userIds: number[], message: PushMessage): Promise<number> {
    const ids = [...new Set(userIds)];
    if (ids.length === 0) return 0;
    const devices = await db.selectFrom('push_subscriptions').select('id').where('user_id', 'in', ids).orderBy('id').execute();
    for (const d of devices) {
      const job: PushJob = { key: randomUUID(), subscriptionId: d.id, message };
      await this.boss.send(this.queue, job, { db: queueConnection(db) });
    }
    return devices.length;
  }

  /**
   * Sends one notification, once: the key is claimed in `push_deliveries` in a transaction around
   * the request to the push service and committed when the service has answered. A failure rolls
   * the claim back and pg-boss retries. Only a process dying between the push service's answer and
   * the commit can show a notification twice (same tag: the second replaces the first).
   */
  private async deliver(job: PushJob): Promise<void> {
    await this.db.transaction().execute(async (trx) => {
      const sub = await trx.selectFrom('push_subscriptions').selectAll().where('id', '=', job.subscriptionId).executeTakeFirst();
      if (!sub) return; // turned off on that device since
      const claimed = await trx
        .insertInto('push_deliveries')
        .values({ key: job.key, subscription_id: sub.id, outcome: 'sent' })
        .onConflict((oc) => oc.doNothing())
        .returning('key')
        .executeTakeFirst();
      if (!claimed) return;
      const problem = endpointProblem(sub.endpoint, this.config);
      if (problem) {
        console.warn(`[push] subscription ${sub.id} not sent to: its address ${problem}`);
        await trx.updateTable('push_deliveries').set({ outcome: 'refused' }).where('key', '=', job.key).execute();
        return;
      }
      try {
        await this.post(sub, job.message);
      } catch (err) {
        const status = err instanceof PushServiceError ? err.status : 0;
        if (status === 404 || status === 410) {
          // The browser unsubscribed, or the push service dropped it: forget this device.
          await trx.deleteFrom('push_subscriptions').where('id', '=', sub.id).execute();
          await trx.updateTable('push_deliveries').set({ outcome: 'gone' }).where('key', '=', job.key).execute();
          return;
        }
        if (status >= 400 && status < 500 && status !== 408 && status !== 429) {
          // A refusal a retry would not change (bad payload, keys): logged, not retried.
          console.warn(`[push] subscription ${sub.id}: the push service refused the notification (${status})`);
          await trx
            .updateTable('push_deliveries')
            .set({ outcome: `refused ${status}` })
            .where('key', '=', job.key)
            .execute();
          return;
        }
        throw err;
      }
    });
  }

  /**
   * Encrypts the message for the device and signs the request with the VAPID keys (web-push), then
   * posts it with Node's fetch: web-push's own sender speaks https only, and the local fake push
   * service is plain http on loopback.
   */
  private async post(sub: { endpoint: string; p256dh: string; auth: string }, message: PushMessage): Promise<void> {
    const request = webpush.generateRequestDetails(
      { endpoint: sub.endpoint, keys: { p256dh: sub.p256dh, auth: sub.auth } },
      JSON.stringify(message),
      {
        vapidDetails: { subject: this.config.push.subject, publicKey: this.keys.publicKey, privateKey: this.keys.privateKey },
        TTL: 6 * 3600,
        urgency: 'high',
      },
    );
    const res = await fetch(request.endpoint, {
      method: request.method,
      headers: request.headers as Record<string, string>,
      body: request.body ? new Uint8Array(request.body) : undefined,
      redirect: 'error',
      signal: AbortSignal.timeout(10_000),
    });
    if (!res.ok) throw new PushServiceError(res.status, (await res.text().catch(() => '')).slice(0, 300));
  }
}

/** A push service's refusal, with its HTTP status. */
class PushServiceError extends Error {
  constructor(
    readonly status: number,
    body: string,
  ) {
    super(`the push service answered ${status}${body ? `: ${body}` : ''}`);
  }
}
