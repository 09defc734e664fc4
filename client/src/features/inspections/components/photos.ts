/** Photos larger than this are scaled down on the phone before they are kept and sent. */
const SHRINK_ABOVE_BYTES = 1.5 * 1024 * 1024;
const LONGEST_SIDE_PX = 2000;
export const MAX_PHOTO_BYTES = 10 * 1024 * 1024;
export const PHOTO_TYPES = ['image/png', 'image/jpeg'];

/**
 * A camera photo scaled so its longest side is at most 2000 px, as JPEG: a 6 MB phone photo becomes
 * a few hundred kB, quick to send on a weak signal and well inside the 10 MB limit. Anything that
 * cannot be scaled here (an old browser, a broken file) is kept as it is; the server judges it.
 */
export async function shrinkPhoto(file: File): Promise<Blob> {
  if (file.size <= SHRINK_ABOVE_BYTES || typeof createImageBitmap !== 'function') return file;
  try {
    const bitmap = await createImageBitmap(file);
    const scale = Math.min(1, LONGEST_SIDE_PX / Math.max(bitmap.width, bitmap.height));
    const canvas = document.createElement('canvas');
    canvas.width = Math.round(bitmap.width * scale);
    canvas.height = Math.round(bitmap.height * scale);
    canvas.getContext('2d')!.drawImage(bitmap, 0, 0, canvas.width, canvas.height);
    bitmap.close();
    const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, 'image/jpeg', 0.85));
    return blob && blob.size < file.size ? blob : file;
  } catch {
    return file;
  }
}

/** Why a picked file cannot go with the inspection, or null when it may. */
export function photoProblem(file: { type: string; size: number; name: string }): string | null {
  if (!PHOTO_TYPES.includes(file.type)) return `${file.name} is not a PNG or JPEG photo.`;
  if (file.size > MAX_PHOTO_BYTES) return `${file.name} is larger than 10 MB.`;
  return null;
}
