import { pushEndpointQuerySchema, pushKeyAnswer, pushStatusAnswer, pushSubscriptionSchema } from '@shared/schemas/push';
import { badRequest, type Api } from '../http';
import { endpointProblem } from '../push/pusher';
import { audit } from '../services/audit';

/**
 * Web Push subscriptions, one per device: the phone view's "Notifications on this phone" switch
 * turns them on and off. A device that someone else had subscribed moves to the person signed in
 * now (a shared phone tells its current user only).
 */
export function registerPushRoutes(api: Api): void {
  const { db, config } = api.deps;

  api.route(
    {
      method: 'get',
      path: '/api/push/key',
      response: pushKeyAnswer,
      summary: "The server's public VAPID key, for a browser's push subscription",
      tag: 'Push',
      access: { kind: 'signedIn' },
    },
    ({ deps }) => ({ publicKey: deps.pusher.keys.publicKey }),
  );

  api.route(
    {
      method: 'get',
      path: '/api/push/subscription',
      response: pushStatusAnswer,
      summary: 'Whether this device (its push endpoint) is told of my permits',
      tag: 'Push',
      access: { kind: 'signedIn' },
      query: pushEndpointQuerySchema,
    },
    async ({ query, user }) => {
      const row = await db
        .selectFrom('push_subscriptions')
        .select('id')
        .where('endpoint', '=', query.endpoint)
        .where('user_id', '=', user.id)
        .executeTakeFirst();
      return { subscribed: Boolean(row) };
    },
  );

  api.route(
    {
      method: 'post',
      path: '/api/push/subscription',
      response: pushStatusAnswer,
      responses: { 201: 'This device is told' },
      summary: 'Tell this device (a browser push subscription) of my permits',
      tag: 'Push',
      access: { kind: 'signedIn' },
      body: pushSubscriptionSchema,
    },
    async ({ body, user, res }) => {
      const problem = endpointProblem(body.endpoint, config);
      if (problem) throw badRequest(`The push address ${problem}.`, { endpoint: problem });
      await db.transaction().execute(async (trx) => {
        await trx
          .insertInto('push_subscriptions')
          .values({ user_id: user.id, endpoint: body.endpoint, p256dh: body.keys.p256dh, auth: body.keys.auth })
          .onConflict((oc) => oc.column('endpoint').doUpdateSet({ user_id: user.id, p256dh: body.keys.p256dh, auth: body.keys.auth }))
          .execute();
        await audit(trx, {
          actorId: user.id,
          siteId: null,
          entity: 'user',
          entityId: user.id,
          action: 'push_on',
          detail: { host: new URL(body.endpoint).host },
        });
      });
      res.status(201);
      return { subscribed: true };
    },
  );

  api.route(
    {
      method: 'delete',
      path: '/api/push/subscription',
      responses: { 204: 'This device is no longer told' },
      summary: 'Stop telling this device (its push endpoint) of my permits',
      tag: 'Push',
      access: { kind: 'signedIn' },
      query: pushEndpointQuerySchema,
    },
    async ({ query, user }) => {
      await db.transaction().execute(async (trx) => {
        const gone = await trx
          .deleteFrom('push_subscriptions')
          .where('endpoint', '=', query.endpoint)
          .where('user_id', '=', user.id)
          .returning('id')
          .executeTakeFirst();
        if (gone)
          await audit(trx, {
            actorId: user.id,
            siteId: null,
            entity: 'user',
            entityId: user.id,
            action: 'push_off',
            detail: { host: new URL(query.endpoint).host },
          });
      });
    },
  );
}
