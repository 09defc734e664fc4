import { createHash, randomBytes } from 'node:crypto';

/** A new single-use token: the secret goes in the link, only its SHA-256 is stored. */
export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url');
  return { token, hash: hashToken(token) };
}

export function hashToken(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}

export const INVITATION_HOURS = 72;
export const RESET_HOURS = 1;
