import { createRequire } from 'node:module';
import type { Server } from 'node:http';
import { pathToFileURL } from 'node:url';

const require = createRequire(import.meta.url);

/**
 * The local fake push service (the `web-push-testing` package's service, bound to 127.0.0.1 only,
 * where its own command line listens on every interface): it hands out subscriptions
 * (POST /subscribe), takes notifications at their endpoints (POST /notify/:clientHash, 410 once
 * expired), decrypts and keeps them (POST /get-notifications { clientHash }), and expires a
 * subscription on request (POST /expire-subscription/:clientHash). `npm start` and `npm test` run
 * it; API tests start one of their own.
 */
export async function startFakePushService(port = 0): Promise<{ url: string; close(): Promise<void> }> {
  const TestingServer = require('web-push-testing/src/server.js') as new (
    model: unknown,
    port: number,
  ) => {
    _app: { listen(port: number, host: string, cb: () => void): Server };
    setRequestHandlers(): void;
  };
  const { PushApiModel } = require('web-push-testing/src/PushApiModel.js') as { PushApiModel: new () => { notifyUrl: string } };
  const model = new PushApiModel();
  const service = new TestingServer(model, port);
  service.setRequestHandlers();
  const server = await new Promise<Server>((resolve, reject) => {
    const s = service._app.listen(port, '127.0.0.1', () => resolve(s));
    s.once('error', reject);
  });
  const address = server.address();
  const url = `http://127.0.0.1:${typeof address === 'object' && address ? address.port : port}`;
  model.notifyUrl = `${url}/notify/`;
  return { url, close: () => new Promise<void>((resolve) => server.close(() => resolve())) };
}

// `tsx server/src/push/fake-service.ts PORT`: run by docker-less-scripts (start.sh, test.sh) until stopped.
if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const service = await startFakePushService(Number(process.argv[2] ?? 0));
  console.log(`[fake push service] ${service.url}`);
  const stop = () => void service.close().then(() => process.exit(0));
  process.on('SIGTERM', stop);
  process.on('SIGINT', stop);
}
