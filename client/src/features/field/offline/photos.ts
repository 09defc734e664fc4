import { shrinkPhoto } from '@client/lib/photos';
import type { OutboxPhoto } from './outbox';

/** A camera photo made ready for the outbox: shrunk (client/src/lib/photos.ts) and read into memory. */
export async function preparePhoto(file: File): Promise<OutboxPhoto> {
  const photo = await shrinkPhoto(file);
  return { name: photo.name || 'photo', type: photo.type, data: await photo.arrayBuffer() };
}
