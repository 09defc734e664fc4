import type { Server } from 'node:http';
import { loadConfig } from './config';
import { createApp } from './app';
import { startRuntime } from './runtime';
import { MailCatcher } from './mail/catcher';
import { migrateToLatest } from '@db/migrate';
import { isDatabaseUnavailable } from '@db/database';
import { DEMO_PASSWORD, demoPeople } from '@db/demo/people';
import { startPermitJobs } from './jobs/permits';
import { checkUnchecked } from './services/permits/check';
import { startInspectionJobs } from './jobs/inspections';

// Starts Brink: database migrations, the job queue, the local mail catcher, and one Express
// process serving the app and the API.

// pg-boss completes or fails a job without waiting for the answer; while PostgreSQL is down that
// promise rejects with nobody to catch it. Such a job stays active, expires and is retried (its
// e-mail carries an idempotency key), so the rejection is logged and Brink keeps running. Any other
// unhandled rejection is a bug: logged, and the process ends (`npm start` restarts it).
let quietUntil = 0;
process.on('unhandledRejection', (reason) => {
  if (isDatabaseUnavailable(reason)) {
    if (Date.now() < quietUntil) return;
    quietUntil = Date.now() + 10_000;
    console.error(`[brink] database unreachable: ${(reason as Error).message}`);
    return;
  }
  console.error('[brink] unhandled rejection; stopping', reason);
  process.exit(1);
});

const config = loadConfig();
const runtime = await startRuntime(config);
const { deps } = runtime;
await migrateToLatest(deps.db);
// Once, before anything reads or moves a permit: keep a check on revisions stored without one (the
// demo seed's; reads never write). A refused one stays without and is named here.
const filled = await checkUnchecked(deps.db, deps.now());
if (filled.refused.length) console.error(`[brink] permits whose check the calculation refuses: ${filled.refused.join(', ')}`);
// Permits go Live and Lapse on the clock; reminders before a window closes.
await startPermitJobs(deps);
await startInspectionJobs(deps);

const catcher = new MailCatcher(deps.db);
if (config.mailCatcher.enabled) {
  try {
    await catcher.start(config.mailCatcher.port);
  } catch (err) {
    console.error(
      `[mail catcher] could not listen on 127.0.0.1:${config.mailCatcher.port} (${(err as Error).message}); e-mail will wait in the queue`,
    );
  }
}

const app = createApp(deps);
// HOST=127.0.0.1 keeps it to this machine (the bench does).
const server = app.listen(config.port, process.env.HOST || '0.0.0.0', () => {
  // start.sh sets PUBLIC_URL to this machine's LAN address when none is given (links and QR codes).
  const onlyHere = ['localhost', '127.0.0.1'].includes(new URL(config.publicUrl).hostname);
  const lines = [
    '',
    `Brink is running at ${config.publicUrl}${onlyHere ? '' : ' (phones on the same network open this; e-mail links and QR codes use it)'}`,
    ...(onlyHere ? [] : [`On this computer: http://localhost:${config.port}`]),
    ...(config.mailCatcher.enabled ? [`Caught e-mail: ${config.publicUrl}/admin/mail (SMTP on 127.0.0.1:${config.mailCatcher.port})`] : []),
    ...(config.demo
      ? ['Demo sign-ins (password for all: ' + DEMO_PASSWORD + '):', ...demoPeople.map((p) => `  ${p.email.padEnd(30)} ${p.name}`)]
      : []),
    'Press Ctrl-C to stop.',
    '',
  ];
  console.log(lines.join('\n'));
});

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`\n${signal}: stopping Brink`);
  await closeServer(server, 10_000);
  await catcher.stop();
  await runtime.stop();
  process.exit(0);
}
/**
 * Stops taking connections and waits for the requests being answered to finish, so that none loses
 * the database under it ("driver has already been destroyed") and a change mid-answer commits or not
 * as a whole; idle keep-alive connections close at once, and any still busy after `ms` are cut.
 */
function closeServer(s: Server, ms: number): Promise<void> {
  return new Promise((resolve) => {
    const cut = setTimeout(() => s.closeAllConnections(), ms);
    s.close(() => {
      clearTimeout(cut);
      resolve();
    });
    s.closeIdleConnections();
  });
}
process.on('SIGINT', () => void stop('SIGINT'));
process.on('SIGTERM', () => void stop('SIGTERM'));
