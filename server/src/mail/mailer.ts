import { randomUUID } from 'node:crypto';
import nodemailer, { type Transporter } from 'nodemailer';
import type PgBoss from 'pg-boss';
import type { Db } from '@db/database';
import { cautionFor } from '@shared/caution';
import type { UnitSystem } from '@shared/units';
import type { Config } from '../config';
import { queueConnection } from '../services/tx';
import { drainingWorker, scheduledQueue } from '../jobs/queues';

interface Message {
  to: string | string[];
  subject: string;
  text: string;
  html?: string;
}

/** Someone a message goes to, and the units they read it in (their own choice, else their site's). */
interface Reader {
  email: string;
  units: UnitSystem;
}

/** A message on the queue: its idempotency key travels with it. */
export interface QueuedMessage extends Message {
  key: string;
}

/**
 * How the mail queue retries: the first retry after 1–2 s, doubling from there (pg-boss's backoff
 * with jitter), 30 tries in all; a delivery taking longer than 30 s is given up and retried (a
 * message takes milliseconds; a job left active by a server that died waits this long, plus up to
 * pg-boss's 20 s maintenance interval, before another worker takes it; a retry of a message still
 * being sent waits on its key's claim and sends nothing).
 * Applied to a queue made by an older version of Brink too (jobs/queues.ts).
 */
export const MAIL_QUEUE_OPTIONS = { retryLimit: 30, retryDelay: 1, retryBackoff: true, expireInSeconds: 30 } as const;

/**
 * Outgoing e-mail, as a transactional outbox. `send(db, message)` puts the message on a queue in
 * PostgreSQL (pg-boss) through `db`: given the transaction of the change that causes it, the
 * message exists if and only if the change committed. A worker delivers one message at a time over
 * SMTP and, when the mail server is down, retries with growing delays. Each message carries an
 * idempotency key, recorded in `mail_deliveries` once the SMTP server has accepted it, so a job
 * delivered again after a crash sends nothing; the key is also the message's Message-ID.
 */
export class Mailer {
  private transport: Transporter | null;

  constructor(
    private readonly boss: PgBoss,
    private readonly db: Db,
    private readonly config: Config,
    readonly queue: string,
  ) {
    this.transport = config.smtpUrl ? nodemailer.createTransport(config.smtpUrl) : null;
  }

  async start(): Promise<void> {
    await scheduledQueue({ boss: this.boss }, this.queue, null, MAIL_QUEUE_OPTIONS);
    await drainingWorker<QueuedMessage>(this.boss, this.queue, (m) => this.deliver(m));
  }

  /**
   * Queues one message through `db`: pass the transaction of the change that causes it. Returns
   * the message's idempotency key (null when it has nobody to go to).
   */
  async send(db: Db, message: Message): Promise<string | null> {
    const to = [message.to].flat().filter(Boolean);
    if (to.length === 0) return null;
    const key = randomUUID();
    const data: QueuedMessage = { ...message, to, key };
    await this.boss.send(this.queue, data, { db: queueConnection(db) });
    return key;
  }

  /**
   * Queues one message per reader through `db`, each composed in the reader's units (figures and the
   * caution; OSHA named for a reader in US units); people do not see each other's addresses.
   * Returns the addresses.
   */
  async sendEach(db: Db, readers: Reader[], compose: (units: UnitSystem) => Omit<Message, 'to'>): Promise<string[]> {
    const composed = new Map<UnitSystem, Omit<Message, 'to'>>();
    for (const r of readers) {
      if (!composed.has(r.units)) composed.set(r.units, compose(r.units));
      await this.send(db, { to: r.email, ...composed.get(r.units)! });
    }
    return readers.map((r) => r.email);
  }

  /**
   * Sends one message, once. The key is claimed (an uncommitted row in `mail_deliveries`) before the
   * message goes to the SMTP server and committed as soon as the server has accepted it: a job
   * delivered twice at the same time waits on the first and then finds the key; a failed send
   * rolls the claim back and pg-boss retries. When the commit fails after the SMTP server accepted
   * (PostgreSQL went away at that moment), the key is remembered in memory and recorded when a retry
   * of the job finds the database again. Only the process dying in the instant between the SMTP
   * server's acceptance and the commit can send a message again, with the same Message-ID, which the
   * receiving side can recognise.
   */
  private async deliver(m: QueuedMessage): Promise<void> {
    const transport = this.transport;
    if (!transport) {
      console.warn(`[mail] no SMTP server configured; message "${m.subject}" to ${[m.to].flat().join(', ')} not sent`);
      return;
    }
    const smtp = () =>
      transport.sendMail({
        from: this.config.mailFrom,
        to: m.to,
        subject: m.subject,
        text: m.text,
        html: m.html,
        ...(m.key ? { messageId: messageIdOf(m.key) } : {}),
      });
    if (!m.key) {
      await smtp();
      return;
    }
    // Accepted earlier by the SMTP server while PostgreSQL was out of reach: record it, send nothing.
    if (this.unrecorded.has(m.key)) return this.record(m);
    let accepted = false;
    try {
      await this.db.transaction().execute(async (trx) => {
        const claimed = await trx
          .insertInto('mail_deliveries')
          .values(deliveryRow(m))
          .onConflict((oc) => oc.doNothing())
          .returning('key')
          .executeTakeFirst();
        if (!claimed) return;
        await smtp();
        accepted = true;
      });
    } catch (err) {
      if (!accepted) throw err;
      // The SMTP server took the message but the commit was lost with the database connection:
      // the key is kept in memory (so a retry of this job sends nothing) until it is recorded.
      this.unrecorded.add(m.key);
      await this.record(m);
    }
  }

  /** Keys of messages the SMTP server accepted whose record could not be written yet. */
  private readonly unrecorded = new Set<string>();

  private async record(m: QueuedMessage): Promise<void> {
    await this.db
      .insertInto('mail_deliveries')
      .values(deliveryRow(m))
      .onConflict((oc) => oc.doNothing())
      .execute();
    this.unrecorded.delete(m.key);
  }
}

/** A message's line in `mail_deliveries`. */
function deliveryRow(m: QueuedMessage) {
  return { key: m.key, recipients: [m.to].flat().join(', '), subject: m.subject };
}

/** The Message-ID header of a queued message: its idempotency key. */
function messageIdOf(key: string): string {
  return `<${key}@brink.mail>`;
}

/** Escapes text for the HTML part of a message. */
function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/**
 * A plain notice: a greeting, paragraphs, one link to act on, and Brink's footer (the caution, naming
 * OSHA's rule for a reader in US units). Text and HTML parts carry the same words.
 */
export function notice(opts: {
  subject: string;
  lines: string[];
  link?: { label: string; url: string };
  units?: UnitSystem;
}): Omit<Message, 'to'> {
  const footer = cautionFor(opts.units);
  const text = [...opts.lines, ...(opts.link ? [`${opts.link.label}: ${opts.link.url}`] : []), '', '-- ', footer].join('\n\n');
  const html = `<div style="font-family:sans-serif;color:#1e293b;max-width:36rem">${opts.lines
    .map((l) => `<p>${escapeHtml(l)}</p>`)
    .join('')}${
    opts.link ? `<p><a href="${escapeHtml(opts.link.url)}">${escapeHtml(opts.link.label)}</a></p>` : ''
  }<hr><p style="font-size:12px;color:#475569">${escapeHtml(footer)}</p></div>`;
  return { subject: opts.subject, text, html };
}
