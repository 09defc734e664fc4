import { z } from 'zod';

type Typed = { password: string; confirm: string };

/**
 * Adds a "type it again" box to a shared schema that sets a password. Client-only: the server
 * receives the password once.
 */
export function withPasswordConfirmation<Shape extends { password: z.ZodType<string> }>(schema: z.ZodObject<Shape>) {
  return schema.extend({ confirm: z.string() }).refine((v) => (v as Typed).confirm === (v as Typed).password, {
    message: 'does not match the password above',
    path: ['confirm'],
  });
}
