import { eq } from 'drizzle-orm';
import nodemailer, { type Transporter } from 'nodemailer';
import type { AppDb } from '../db/client.js';
import { mailSends, type MAIL_KINDS } from '../db/schema/index.js';
import type { MailConfig } from './mail-config.js';

export interface OutgoingMail {
  kind: (typeof MAIL_KINDS)[number];
  to: string[];
  subject: string;
  text: string;
  /** e.g. 'job:42': lets callers find (and avoid repeating) the mail about one thing. */
  ref?: string;
}

export interface SendOutcome {
  id: number;
  state: 'sent' | 'failed';
  attempts: number;
  error?: string;
}

/**
 * Sends mail with nodemailer over SMTP (our local receiver or a real relay). Each message is
 * logged in `mail_sends`; a failed attempt is retried with doubling delays, and a message that
 * still fails is marked failed and logged. send() never throws: mail must not fail a job.
 */
export class Mailer {
  private readonly transport: Transporter;
  private readonly inFlight = new Set<Promise<unknown>>();
  private closed = false;
  readonly relayLabel: string;

  constructor(
    private readonly db: AppDb,
    private readonly config: MailConfig,
    localPort: number,
    private readonly log: (level: 'info' | 'warn' | 'error', message: string) => void,
  ) {
    const r = config.relay;
    this.transport = r
      ? nodemailer.createTransport({
          host: r.host,
          port: r.port,
          secure: r.secure,
          requireTLS: r.requireTls,
          auth: r.user ? { user: r.user, pass: r.pass ?? '' } : undefined,
          connectionTimeout: 15_000,
          greetingTimeout: 10_000,
          socketTimeout: 30_000,
        })
      : nodemailer.createTransport({ host: '127.0.0.1', port: localPort, secure: false, ignoreTLS: true, connectionTimeout: 5_000 });
    this.relayLabel = r ? `${r.host}:${r.port}` : 'local receiver';
  }

  /** Queues, sends with retries, and resolves with how it ended (never rejects). */
  send(mail: OutgoingMail): Promise<SendOutcome | undefined> {
    if (this.closed || mail.to.length === 0) return Promise.resolve(undefined);
    const p = this.deliver(mail).catch((err: unknown) => {
      this.log('error', `mail "${mail.subject}" could not be logged or sent: ${(err as Error).message}`);
      return undefined;
    });
    this.inFlight.add(p);
    void p.finally(() => this.inFlight.delete(p));
    return p;
  }

  /** Resolves when every message handed over so far has been sent or given up (tests, shutdown). */
  async idle(): Promise<void> {
    while (this.inFlight.size) await Promise.allSettled([...this.inFlight]);
  }

  async close(): Promise<void> {
    this.closed = true;
    await this.idle();
    this.transport.close();
  }

  private async deliver(mail: OutgoingMail): Promise<SendOutcome> {
    const [row] = await this.db
      .insert(mailSends)
      .values({ kind: mail.kind, toAddresses: mail.to, subject: mail.subject, relay: this.relayLabel, subjectRef: mail.ref ?? null })
      .returning({ id: mailSends.id });
    let lastError = '';
    for (let attempt = 1; attempt <= this.config.attempts; attempt++) {
      try {
        const info = await this.transport.sendMail({ from: this.config.from, to: mail.to, subject: mail.subject, text: mail.text });
        await this.db
          .update(mailSends)
          .set({ state: 'sent', attempts: attempt, sentAt: new Date(), messageId: info.messageId ?? null, lastError: attempt > 1 ? lastError : null })
          .where(eq(mailSends.id, row.id));
        return { id: row.id, state: 'sent', attempts: attempt };
      } catch (err) {
        lastError = (err as Error).message;
        await this.db.update(mailSends).set({ attempts: attempt, lastError }).where(eq(mailSends.id, row.id));
        const last = attempt === this.config.attempts || this.closed;
        this.log(last ? 'error' : 'warn', `mail "${mail.subject}" to ${mail.to.join(', ')} via ${this.relayLabel}: attempt ${attempt} of ${this.config.attempts} failed: ${lastError}`);
        if (last) break;
        await delay(this.config.retryDelayMs * 2 ** (attempt - 1));
      }
    }
    await this.db.update(mailSends).set({ state: 'failed' }).where(eq(mailSends.id, row.id));
    return { id: row.id, state: 'failed', attempts: this.config.attempts, error: lastError };
  }
}

const delay = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms).unref());
