export const MAX_PHOTO_BYTES = 10 * 1024 * 1024;
export const PHOTO_TYPES = ['image/png', 'image/jpeg'];

/** Why a picked file cannot go with the inspection, or null when it may. */
export function photoProblem(file: { type: string; size: number; name: string }): string | null {
  if (!PHOTO_TYPES.includes(file.type)) return `${file.name} is not a PNG or JPEG photo.`;
  if (file.size > MAX_PHOTO_BYTES) return `${file.name} is larger than 10 MB.`;
  return null;
}
