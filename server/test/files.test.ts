import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { S3Client } from '@aws-sdk/client-s3';
import { DiskStore, MissingFile, S3Store, type FileStore } from '../src/files/store';
import { FAKE_S3_KEY, startFakeS3 } from '../src/files/fake-s3';
import { filesIn } from './helpers';

// The two kinds of upload store behave alike (server/src/files/store.ts); the S3 one against the
// local fake S3 store (s3rver), in a folder of this file's own.
const work = mkdtempSync(join(tmpdir(), 'brink-files-'));
let fake: Awaited<ReturnType<typeof startFakeS3>>;
let s3: S3Store;
const disk = new DiskStore(join(work, 'disk'));
const former = new DiskStore(join(work, 'former'));

beforeAll(async () => {
  fake = await startFakeS3(join(work, 's3'));
  const client = new S3Client({ endpoint: fake.url, region: 'us-east-1', forcePathStyle: true, credentials: FAKE_S3_KEY });
  s3 = new S3Store(client, `brink-files-${randomUUID().slice(0, 8)}`, former);
  await s3.ready();
  await s3.ready(); // a second start finds the bucket
  await disk.ready();
});
afterAll(async () => {
  await fake.close();
  rmSync(work, { recursive: true, force: true });
});

describe.each([
  ['disk', () => disk],
  ['s3', () => s3],
] as const)('the %s store', (_kind, store: () => FileStore) => {
  it('keeps, streams, reads and removes a file byte for byte; a missing one is MissingFile', async () => {
    const key = `2026-12/${randomUUID()}.png`;
    const body = Buffer.from(Array.from({ length: 70_000 }, (_, i) => (i * 7) % 256));
    const before = await filesIn(store());
    await store().put(key, body, 'image/png');
    expect(await filesIn(store())).toBe(before + 1);
    expect((await store().read(key)).equals(body)).toBe(true);
    const chunks: Buffer[] = [];
    for await (const c of await store().open(key)) chunks.push(Buffer.from(c as Uint8Array));
    expect(Buffer.concat(chunks).equals(body)).toBe(true);
    await store().remove(key);
    await store().remove(key); // gone already: fine
    expect(await filesIn(store())).toBe(before);
    await expect(store().read(key)).rejects.toBeInstanceOf(MissingFile);
    await expect(store().open(`2026-12/${randomUUID()}.pdf`)).rejects.toBeInstanceOf(MissingFile);
  });
});

describe('after a switch from disk to S3', () => {
  it('reads a file kept on disk before the switch when the bucket has none of that key; new files go to the bucket', async () => {
    const key = `2025-01/${randomUUID()}.pdf`;
    await former.put(key, Buffer.from('%PDF-1.4 old drawing'), 'application/pdf');
    expect((await s3.read(key)).toString()).toBe('%PDF-1.4 old drawing');
    const fresh = `2026-12/${randomUUID()}.pdf`;
    await s3.put(fresh, Buffer.from('%PDF-1.4 new'), 'application/pdf');
    expect(await former.has(fresh)).toBe(false);
  });

  it('refuses a key that would leave the upload folder', async () => {
    await expect(disk.read('../outside.txt')).rejects.toThrow(/bad storage key/);
  });
});
