import { CONCERN_PHOTO_BYTES_MAX } from '@shared/schemas/concern';

/**
 * The one photo shrinker of the phone and the browser (concerns, inspections). A camera photo is
 * redrawn as a JPEG whose longest side is at most PHOTO_LONG_SIDE: enough to see a crack, small enough
 * to send on one bar of signal (a 6 MB phone photo becomes a few hundred kB). Other formats the
 * browser can decode become JPEG too. A photo that is already small and a JPEG or PNG, or anything
 * the browser cannot decode, comes back as it is; the server judges type and size again.
 */
const PHOTO_LONG_SIDE = 1600;

/**
 * What the server takes as a photo (inspections and concerns alike): PNG or JPEG, at most 10 MB
 * (server/src/services/uploads.ts, `limits.image`). The browser checks a shrunk photo against it.
 */
export const PHOTO_TYPES: readonly string[] = ['image/png', 'image/jpeg'];
export const PHOTO_BYTES_MAX = CONCERN_PHOTO_BYTES_MAX;

export async function shrinkPhoto(file: File): Promise<File> {
  if (typeof createImageBitmap !== 'function' || typeof document === 'undefined') return file;
  try {
    const bitmap = await createImageBitmap(file);
    const scale = Math.min(1, PHOTO_LONG_SIDE / Math.max(bitmap.width, bitmap.height));
    const canvas = document.createElement('canvas');
    canvas.width = Math.max(1, Math.round(bitmap.width * scale));
    canvas.height = Math.max(1, Math.round(bitmap.height * scale));
    const ctx = canvas.getContext('2d');
    if (!ctx) return file;
    ctx.drawImage(bitmap, 0, 0, canvas.width, canvas.height);
    bitmap.close();
    const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, 'image/jpeg', 0.85));
    if (!blob || (blob.size >= file.size && /^image\/(jpeg|png)$/.test(file.type))) return file;
    return new File([blob], `${(file.name || 'photo').replace(/\.[^.]*$/, '')}.jpg`, { type: 'image/jpeg' });
  } catch {
    return file;
  }
}
