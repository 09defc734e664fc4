import { z } from 'zod';

// Answers of the system routes (server/src/routes/system.ts).
export const healthAnswer = z.object({ ok: z.literal(true), database: z.literal('ok'), demo: z.boolean(), mailCatcher: z.boolean() });
export type HealthAnswer = z.infer<typeof healthAnswer>;
export const configAnswer = z.object({ mapTileUrl: z.string().nullable(), mapTileAttribution: z.string(), demo: z.boolean() });
export type ConfigAnswer = z.infer<typeof configAnswer>;
export const caughtMessageAnswer = z.object({
  id: z.number().int(),
  from: z.string(),
  to: z.string(),
  subject: z.string(),
  text: z.string(),
  html: z.string().nullable(),
  date: z.iso.datetime(),
});
export type CaughtMessage = z.infer<typeof caughtMessageAnswer>;
export const caughtMailAnswer = z.object({ messages: z.array(caughtMessageAnswer) });
/** The OpenAPI 3.1 document itself. */
export const openApiAnswer = z.looseObject({
  openapi: z.literal('3.1.0'),
  info: z.object({ title: z.string(), version: z.string() }).loose(),
  paths: z.record(z.string(), z.unknown()),
});
export type OpenApiAnswer = z.infer<typeof openApiAnswer>;
