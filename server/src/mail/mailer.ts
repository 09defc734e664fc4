import nodemailer, { type Transporter } from 'nodemailer';
import type PgBoss from 'pg-boss';
import type { Config } from '../config';

export interface Message {
  to: string | string[];
  subject: string;
  text: string;
  html?: string;
}

/**
 * Outgoing e-mail. `send` only puts the message on a queue in PostgreSQL (pg-boss), in the same
 * breath as the change that caused it; a worker delivers it over SMTP and, when the mail server is
 * down, retries with growing delays, so no message is lost.
 */
export class Mailer {
  private transport: Transporter | null;

  constructor(
    private readonly boss: PgBoss,
    private readonly config: Config,
    readonly queue: string,
  ) {
    this.transport = config.smtpUrl
      ? nodemailer.createTransport(config.smtpUrl)
      : null;
  }

  async start(): Promise<void> {
    await this.boss.createQueue(this.queue, {
      name: this.queue,
      retryLimit: 30,
      retryDelay: 1,
      retryBackoff: true,
      expireInMinutes: 5,
    });
    await this.boss.work<Message>(this.queue, { pollingIntervalSeconds: 0.5, batchSize: 5 }, async (jobs) => {
      for (const job of jobs) await this.deliver(job.data);
    });
  }

  async send(message: Message): Promise<void> {
    const to = [message.to].flat().filter(Boolean);
    if (to.length === 0) return;
    await this.boss.send(this.queue, { ...message, to });
  }

  private async deliver(m: Message): Promise<void> {
    if (!this.transport) {
      console.warn(`[mail] no SMTP server configured; message "${m.subject}" to ${[m.to].flat().join(', ')} not sent`);
      return;
    }
    await this.transport.sendMail({ from: this.config.mailFrom, to: m.to, subject: m.subject, text: m.text, html: m.html });
  }
}

/** Escapes text for the HTML part of a message. */
export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

/**
 * A plain notice: a greeting, paragraphs, one link to act on, and Brink's footer. Text and HTML
 * parts carry the same words.
 */
export function notice(opts: { subject: string; lines: string[]; link?: { label: string; url: string } }): Omit<Message, 'to'> {
  const footer = 'Brink aids a competent temporary works coordinator; it does not replace the design of the support. Local regulations and licensed practice prevail.';
  const text = [...opts.lines, ...(opts.link ? [`${opts.link.label}: ${opts.link.url}`] : []), '', '-- ', footer].join('\n\n');
  const html = `<div style="font-family:sans-serif;color:#1e293b;max-width:36rem">${opts.lines
    .map((l) => `<p>${escapeHtml(l)}</p>`)
    .join('')}${
    opts.link ? `<p><a href="${escapeHtml(opts.link.url)}">${escapeHtml(opts.link.label)}</a></p>` : ''
  }<hr><p style="font-size:12px;color:#475569">${escapeHtml(footer)}</p></div>`;
  return { subject: opts.subject, text, html };
}
