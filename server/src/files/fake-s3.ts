import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';

const require = createRequire(import.meta.url);

/** The fake's one key pair (s3rver's own account): local use only, never a real credential. */
export const FAKE_S3_KEY = { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' } as const;

/**
 * The local S3-compatible object store (the `s3rver` package) on 127.0.0.1, keeping its objects in
 * `dir`: `npm start` runs it with its data under .data/s3, `npm test` in its throw-away folder
 * (docker-less-scripts/lib.sh `start_fake_s3`). Brink talks to it through the S3 API, as to any
 * other S3-compatible store; it checks request signatures against FAKE_S3_KEY.
 */
export async function startFakeS3(dir: string, port = 0): Promise<{ url: string; close(): Promise<void> }> {
  const S3rver = require('s3rver') as new (options: object) => { run(): Promise<{ port: number }>; close(): Promise<void> };
  const fake = new S3rver({ address: '127.0.0.1', port, silent: true, directory: dir });
  const { port: bound } = await fake.run();
  return { url: `http://127.0.0.1:${bound}`, close: () => fake.close() };
}

// `tsx server/src/files/fake-s3.ts DIR PORT`: run by docker-less-scripts (start.sh, test.sh, dev.sh) until stopped.
if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const fake = await startFakeS3(process.argv[2] ?? '.data/s3', Number(process.argv[3] ?? 0));
  console.log(`[fake S3] ${fake.url}`);
  const stop = () => void fake.close().then(() => process.exit(0));
  process.on('SIGTERM', stop);
  process.on('SIGINT', stop);
}
