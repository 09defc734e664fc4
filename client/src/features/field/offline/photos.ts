import type { OutboxPhoto } from './outbox';

/** The longest side of a photo sent from the phone (px): enough to see a crack, small enough for one bar of signal. */
export const PHOTO_LONG_SIDE = 1600;

/**
 * A camera photo made ready for the outbox: redrawn as a JPEG no larger than PHOTO_LONG_SIDE when the
 * browser can decode it (which also turns other formats into JPEG), else kept as it came. The server
 * checks the type and size again.
 */
export async function preparePhoto(file: File): Promise<OutboxPhoto> {
  const original = async (): Promise<OutboxPhoto> => ({ name: file.name || 'photo', type: file.type, data: await file.arrayBuffer() });
  if (typeof createImageBitmap !== 'function' || typeof document === 'undefined') return original();
  try {
    const bitmap = await createImageBitmap(file);
    const scale = Math.min(1, PHOTO_LONG_SIDE / Math.max(bitmap.width, bitmap.height));
    const canvas = document.createElement('canvas');
    canvas.width = Math.max(1, Math.round(bitmap.width * scale));
    canvas.height = Math.max(1, Math.round(bitmap.height * scale));
    const ctx = canvas.getContext('2d');
    if (!ctx) return original();
    ctx.drawImage(bitmap, 0, 0, canvas.width, canvas.height);
    bitmap.close();
    const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, 'image/jpeg', 0.82));
    if (!blob || (scale === 1 && blob.size >= file.size && /^image\/(jpeg|png)$/.test(file.type))) return original();
    return { name: `${(file.name || 'photo').replace(/\.[^.]*$/, '')}.jpg`, type: 'image/jpeg', data: await blob.arrayBuffer() };
  } catch {
    return original();
  }
}
