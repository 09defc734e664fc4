import { z } from 'zod';

/** A browser's push subscription (PushSubscription.toJSON()), as the phone view sends it. */
export const pushSubscriptionSchema = z.object({
  endpoint: z.string().trim().min(1, 'is required').max(2000, 'must be at most 2000 characters'),
  keys: z.object({
    p256dh: z.string().trim().min(1, 'is required').max(200, 'must be at most 200 characters'),
    auth: z.string().trim().min(1, 'is required').max(100, 'must be at most 100 characters'),
  }),
});

export const pushEndpointQuerySchema = z.object({ endpoint: pushSubscriptionSchema.shape.endpoint });

/** GET /api/push/key */
export const pushKeyAnswer = z.object({ publicKey: z.string() });
export type PushKeyAnswer = z.infer<typeof pushKeyAnswer>;

/** GET and POST /api/push/subscription: is this device told, for the person signed in? */
export const pushStatusAnswer = z.object({ subscribed: z.boolean() });
export type PushStatusAnswer = z.infer<typeof pushStatusAnswer>;
