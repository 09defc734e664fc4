import { randomUUID } from 'node:crypto';
import { pipeline } from 'node:stream/promises';
import multer from 'multer';
import { fileTypeFromBuffer } from 'file-type';
import type { Request, RequestHandler, Response } from 'express';
import type { Db } from '@db/database';
import type { Deps } from '../deps';
import { badText, HttpError } from '../http';
import { MissingFile } from '../files/store';

export const MB = 1024 * 1024;

/** What each kind of upload may be, judged from the file's content (its first bytes), not its name. */
export const accepts = {
  pdf: { mimes: ['application/pdf'], words: 'a PDF' },
  image: { mimes: ['image/png', 'image/jpeg'], words: 'a PNG or JPEG image' },
  pdfOrImage: { mimes: ['application/pdf', 'image/png', 'image/jpeg'], words: 'a PDF, PNG or JPEG file' },
} as const;
export type Accept = keyof typeof accepts;

/** Size limits: drawings and documents 20 MB, images 10 MB. */
export const limits = { pdf: 20 * MB, image: 10 * MB, pdfOrImage: 20 * MB } as const;

/**
 * Multer in memory for the named file fields, with a size limit (over it: 413 naming the field).
 * Use as `before` on a route, so that authorisation comes first. A body that cannot be read (cut
 * short, not well-formed multipart) is 400, and so is a file name holding a NUL character or half
 * a surrogate pair (naming the field). The files it hands on are tracked: whatever `storeUpload`
 * writes for them and the request does not keep is removed when the route ends (`discardUnkept`).
 */
export function receiveFiles(fields: string[], maxBytes: number, maxCount = 1): RequestHandler {
  const receive = multer({ storage: multer.memoryStorage(), limits: { fileSize: maxBytes, files: fields.length * maxCount } }).fields(
    fields.map((name) => ({ name, maxCount })),
  );
  return (req, res, next) => {
    receive(req, res, (err: unknown) => {
      if (err) {
        if (err instanceof multer.MulterError) return next(err);
        return next(
          new HttpError(
            400,
            'invalid',
            'The upload could not be read: it was cut short or is not well-formed multipart/form-data. Send it again.',
          ),
        );
      }
      const written: string[] = [];
      writtenBy.set(req, written);
      for (const field of fields) {
        const files = filesOf(req, field);
        for (const [i, f] of files.entries()) {
          const name = files.length > 1 ? `${field}[${i}]` : field;
          const why = badText(f.originalname)['(body)'];
          if (why)
            return next(new HttpError(400, 'invalid', `The name of the file in ${name} ${why}.`, { [name]: `its file name ${why}` }));
          writtenFor.set(f, written);
        }
      }
      next();
    });
  };
}

/** Storage keys written by `storeUpload` for the files of one request (`receiveFiles`). */
const writtenBy = new WeakMap<Request, string[]>();
const writtenFor = new WeakMap<Express.Multer.File, string[]>();

/**
 * After a route with files has ended (answered, refused or rolled back; Api.route calls it): removes
 * every file that `storeUpload` wrote for this request and that no committed `uploads` row keeps.
 * The one place where refused and rolled-back uploads are cleaned up.
 */
export async function discardUnkept(deps: Pick<Deps, 'db' | 'files'>, req: Request): Promise<string[]> {
  const written = writtenBy.get(req);
  if (!written?.length) return [];
  const kept = new Set(
    (await deps.db.selectFrom('uploads').select('storage_key').where('storage_key', 'in', written).execute()).map((r) => r.storage_key),
  );
  const removed = written.filter((k) => !kept.has(k));
  for (const key of removed) {
    await deps.files.remove(key).catch((e: unknown) => console.error(`[uploads] could not remove ${key}`, e));
  }
  written.length = 0;
  return removed;
}

/** The files of one field of a multipart request (after receiveFiles). */
export function filesOf(req: { files?: unknown }, field: string): Express.Multer.File[] {
  const files = req.files as Record<string, Express.Multer.File[]> | undefined;
  return files?.[field] ?? [];
}

interface StoredUpload {
  id: number;
  mime: string;
  size: number;
  originalName: string;
}

/**
 * The type of a received file judged from its content; a file of the wrong type answers 400 naming
 * the field. storeUpload calls it; call it yourself to check several files before storing any.
 */
export async function checkUploadType(file: Express.Multer.File, field: string, accept: Accept): Promise<{ mime: string; ext: string }> {
  const rule = accepts[accept];
  const detected = await fileTypeFromBuffer(file.buffer);
  if (!detected || !(rule.mimes as readonly string[]).includes(detected.mime)) {
    throw new HttpError(
      400,
      'invalid',
      `The file in ${field} must be ${rule.words}; its content is ${detected ? detected.mime : 'not a known type'}.`,
      {
        [field]: `must be ${rule.words}`,
      },
    );
  }
  return detected;
}

/**
 * Checks a received file's type from its content and keeps it in the file store (UPLOAD_DIR or the
 * S3 bucket; never public), recording it in `uploads`. A file of the wrong type answers 400 naming the field.
 */
export async function storeUpload(
  deps: Pick<Deps, 'db' | 'files'>,
  file: Express.Multer.File,
  opts: { field: string; accept: Accept; purpose: string; siteId: number | null; userId: number | null; db?: Db },
): Promise<StoredUpload> {
  const detected = await checkUploadType(file, opts.field, opts.accept);
  const key = `${new Date().toISOString().slice(0, 7)}/${randomUUID()}.${detected.ext}`;
  // Noted before writing: if the request does not keep it (refused, rolled back), it is removed.
  writtenFor.get(file)?.push(key);
  await deps.files.put(key, file.buffer, detected.mime);
  const row = await (opts.db ?? deps.db)
    .insertInto('uploads')
    .values({
      site_id: opts.siteId,
      purpose: opts.purpose,
      original_name: file.originalname.slice(0, 200),
      mime: detected.mime,
      size: file.size,
      storage_key: key,
      uploaded_by: opts.userId,
    })
    .returning(['id', 'mime', 'size', 'original_name'])
    .executeTakeFirstOrThrow();
  return { id: row.id, mime: row.mime, size: row.size, originalName: row.original_name };
}

/**
 * Sends a stored upload with its checked type; `inline` for images and PDFs shown in the page.
 * Streamed through this server from the store, after the route's access check: the store itself
 * is never handed out (no public or signed address).
 */
export async function sendUpload(deps: Pick<Deps, 'db' | 'files'>, res: Response, id: number, inline = true): Promise<void> {
  const row = await deps.db.selectFrom('uploads').selectAll().where('id', '=', id).executeTakeFirst();
  if (!row) throw new HttpError(404, 'not_found', 'That file was not found.');
  const body = await deps.files.open(row.storage_key).catch((e: unknown) => {
    if (!(e instanceof MissingFile)) throw e;
    console.error(`[uploads] upload ${id} is recorded but ${e.message}`);
    throw new HttpError(404, 'not_found', 'That file is recorded but its content is missing. Upload it again.');
  });
  res.setHeader('Content-Type', row.mime);
  res.setHeader('Content-Length', String(row.size));
  res.setHeader('X-Content-Type-Options', 'nosniff');
  res.setHeader('Cache-Control', 'private, max-age=3600');
  res.setHeader('Content-Disposition', `${inline ? 'inline' : 'attachment'}; filename*=UTF-8''${encodeURIComponent(row.original_name)}`);
  await pipeline(body, res);
}
