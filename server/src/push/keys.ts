import { chmodSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';
import webpush from 'web-push';

export interface VapidKeys {
  publicKey: string;
  privateKey: string;
}

/**
 * The server's VAPID key pair (how push services know the notifications come from this Brink):
 * read from `file`, or made and written there (readable by this user only) when it does not exist
 * yet. Browsers subscribe with the public key, so it must stay the same across restarts.
 */
export function loadOrMakeVapidKeys(file: string): VapidKeys {
  try {
    const kept = JSON.parse(readFileSync(file, 'utf8')) as Partial<VapidKeys>;
    if (typeof kept.publicKey === 'string' && typeof kept.privateKey === 'string')
      return { publicKey: kept.publicKey, privateKey: kept.privateKey };
    throw new Error(`${file} does not hold a publicKey and a privateKey`);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'ENOENT') throw err;
  }
  const keys = webpush.generateVAPIDKeys();
  mkdirSync(dirname(file), { recursive: true });
  // 'wx': two processes starting at once cannot overwrite each other's pair; the loser reads it.
  try {
    writeFileSync(file, JSON.stringify(keys, null, 2) + '\n', { flag: 'wx', mode: 0o600 });
    chmodSync(file, 0o600);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'EEXIST') return loadOrMakeVapidKeys(file);
    throw err;
  }
  return keys;
}
