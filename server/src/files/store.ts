import { createReadStream } from 'node:fs';
import { mkdir, readFile, stat, unlink, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { Readable } from 'node:stream';
import {
  CreateBucketCommand,
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import type { Config } from '../config';

/**
 * Where uploaded files (drawings, photos, attachments) are kept: one interface, two kinds
 * (STORAGE=disk|s3). Keys are relative paths (`2026-12/<uuid>.png`), the same in both, recorded in
 * `uploads.storage_key`. Nothing here decides who may read a file: Brink's routes check access first
 * and stream the file through the server (services/uploads.ts `sendUpload`); the store is never
 * reachable by the public.
 */
export interface FileStore {
  readonly kind: 'disk' | 's3';
  /** Makes the place ready (the folder; the bucket when it does not exist yet). */
  ready(): Promise<void>;
  put(key: string, body: Buffer, mime: string): Promise<void>;
  /** A stream of the file; rejects with MissingFile when there is none. */
  open(key: string): Promise<Readable>;
  read(key: string): Promise<Buffer>;
  /** Removes the file; a file already gone is fine. */
  remove(key: string): Promise<void>;
}

/** A stored upload whose file is not in the store. */
export class MissingFile extends Error {
  constructor(readonly key: string) {
    super(`the file ${key} is not in the store`);
  }
}

/** Files under a folder on this machine's disk (UPLOAD_DIR), readable only by Brink (mode 600). */
export class DiskStore implements FileStore {
  readonly kind = 'disk' as const;
  constructor(readonly dir: string) {}

  private where(key: string): string {
    const full = path.resolve(this.dir, key);
    if (!full.startsWith(path.resolve(this.dir) + path.sep)) throw new Error(`bad storage key ${key}`);
    return full;
  }

  async ready(): Promise<void> {
    await mkdir(this.dir, { recursive: true });
  }

  async put(key: string, body: Buffer, _mime?: string): Promise<void> {
    const full = this.where(key);
    await mkdir(path.dirname(full), { recursive: true });
    await writeFile(full, body, { mode: 0o600 });
  }

  async has(key: string): Promise<boolean> {
    return stat(this.where(key)).then(
      (s) => s.isFile(),
      () => false,
    );
  }

  async open(key: string): Promise<Readable> {
    const s = createReadStream(this.where(key));
    await new Promise<void>((resolve, reject) => {
      s.once('open', () => resolve());
      s.once('error', (e: NodeJS.ErrnoException) => reject(e.code === 'ENOENT' ? new MissingFile(key) : e));
    });
    return s;
  }

  async read(key: string): Promise<Buffer> {
    return readFile(this.where(key)).catch((e: NodeJS.ErrnoException) => {
      throw e.code === 'ENOENT' ? new MissingFile(key) : e;
    });
  }

  async remove(key: string): Promise<void> {
    await unlink(this.where(key)).catch((e: NodeJS.ErrnoException) => {
      if (e.code !== 'ENOENT') throw e;
    });
  }
}

const notFound = (e: unknown) =>
  e instanceof S3ServiceException && (e.name === 'NoSuchKey' || e.name === 'NotFound' || e.$metadata.httpStatusCode === 404);

/**
 * Files in a bucket of an S3-compatible object store, through the S3 API. Objects stay private (no
 * ACL, no public URL). `formerDisk`: files written to disk before the switch to S3 are still read
 * from UPLOAD_DIR when the bucket has no object of that key (README, "Uploads on disk").
 */
export class S3Store implements FileStore {
  readonly kind = 's3' as const;
  constructor(
    readonly client: S3Client,
    readonly bucket: string,
    private readonly formerDisk: DiskStore | null = null,
  ) {}

  async ready(): Promise<void> {
    try {
      await this.client.send(new HeadBucketCommand({ Bucket: this.bucket }));
    } catch (e) {
      if (!notFound(e)) throw e;
      await this.client.send(new CreateBucketCommand({ Bucket: this.bucket }));
    }
  }

  async put(key: string, body: Buffer, mime: string): Promise<void> {
    await this.client.send(new PutObjectCommand({ Bucket: this.bucket, Key: key, Body: body, ContentType: mime }));
  }

  async open(key: string): Promise<Readable> {
    try {
      const out = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: key }));
      return out.Body as Readable;
    } catch (e) {
      if (!notFound(e)) throw e;
      if (this.formerDisk && (await this.formerDisk.has(key))) return this.formerDisk.open(key);
      throw new MissingFile(key);
    }
  }

  async read(key: string): Promise<Buffer> {
    const chunks: Buffer[] = [];
    for await (const c of await this.open(key)) chunks.push(Buffer.from(c as Uint8Array));
    return Buffer.concat(chunks);
  }

  async remove(key: string): Promise<void> {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.bucket, Key: key }));
  }
}

/** The store the settings name (STORAGE, UPLOAD_DIR, S3_*: README's settings table). */
export function createFileStore(config: Config): FileStore {
  const disk = new DiskStore(config.uploadDir);
  if (config.storage.kind === 'disk') return disk;
  const s3 = config.storage;
  const client = new S3Client({
    region: s3.region,
    ...(s3.endpoint ? { endpoint: s3.endpoint, forcePathStyle: true } : {}),
    // Without keys in the settings the SDK's own chain applies (AWS_* variables, an instance role).
    ...(s3.accessKeyId && s3.secretAccessKey ? { credentials: { accessKeyId: s3.accessKeyId, secretAccessKey: s3.secretAccessKey } } : {}),
  });
  return new S3Store(client, s3.bucket, disk);
}
