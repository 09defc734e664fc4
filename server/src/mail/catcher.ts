import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';
import type { Db } from '@db/database';

/**
 * The local mail catcher: an SMTP server on loopback that keeps every message it receives in the
 * `caught_mail` table instead of delivering it. Used in place of a hosted mail service locally
 * and in tests.
 */
export class MailCatcher {
  private server: SMTPServer | null = null;

  constructor(private readonly db: Db) {}

  get running(): boolean {
    return this.server !== null;
  }

  async start(port: number): Promise<void> {
    if (this.server) return;
    const db = this.db;
    const server = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS', 'AUTH'],
      logger: false,
      banner: 'Brink local mail catcher',
      size: 25 * 1024 * 1024,
      onData(stream, session, callback) {
        simpleParser(stream)
          .then(async (mail) => {
            const to = session.envelope.rcptTo.map((r) => r.address).join(', ') || addresses(mail.to);
            await db
              .insertInto('caught_mail')
              .values({
                mail_from: session.envelope.mailFrom ? session.envelope.mailFrom.address : addresses(mail.from),
                mail_to: to,
                subject: mail.subject ?? '',
                text: mail.text ?? '',
                html: typeof mail.html === 'string' ? mail.html : null,
              })
              .execute();
            callback();
          })
          .catch((err: Error) => callback(err));
      },
    });
    await new Promise<void>((resolve, reject) => {
      server.once('error', reject);
      server.listen(port, '127.0.0.1', () => {
        server.off('error', reject);
        resolve();
      });
    });
    server.on('error', (err) => console.error('[mail catcher]', err.message));
    this.server = server;
  }

  async stop(): Promise<void> {
    const s = this.server;
    this.server = null;
    if (s) await new Promise<void>((resolve) => s.close(() => resolve()));
  }
}

function addresses(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return '';
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ');
}
