import type { AddressInfo } from 'node:net';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { AppDb } from '../db/client.js';
import { mailMessages } from '../db/schema/index.js';

/** Larger messages are refused at the SMTP level (ours are a few kB). */
const MAX_MESSAGE_BYTES = 10 * 1024 * 1024;

/**
 * The built-in SMTP receiver for local use: a real SMTP server (smtp-server) on loopback that
 * accepts any message and stores it in `mail_messages`, where admins read it in the Outbox.
 * It listens on 127.0.0.1 only and needs no authentication for that reason; nothing it
 * accepts is forwarded anywhere.
 */
export class LocalSmtpReceiver {
  private server?: SMTPServer;
  private portNumber = 0;

  constructor(
    private readonly db: AppDb,
    private readonly onError: (message: string) => void,
  ) {}

  get port(): number {
    return this.portNumber;
  }

  async start(port: number): Promise<void> {
    const server = new SMTPServer({
      name: 'nullsmith-outbox',
      banner: 'Nullsmith local outbox: messages are kept for the Outbox page and go nowhere else',
      authOptional: true,
      disabledCommands: ['AUTH', 'STARTTLS'],
      size: MAX_MESSAGE_BYTES,
      logger: false,
      onData: (stream, session, callback) => {
        const chunks: Buffer[] = [];
        stream.on('data', (c: Buffer) => chunks.push(c));
        stream.on('error', (err) => callback(err));
        stream.on('end', () => {
          if ((stream as unknown as { sizeExceeded?: boolean }).sizeExceeded) {
            return callback(Object.assign(new Error('Message exceeds the 10 MiB the local outbox keeps'), { responseCode: 552 }));
          }
          const raw = Buffer.concat(chunks);
          this.store(raw, session.envelope.mailFrom ? session.envelope.mailFrom.address : '', session.envelope.rcptTo.map((r) => r.address)).then(
            () => callback(),
            (err: unknown) => {
              this.onError(`local outbox could not store a message: ${(err as Error).message}`);
              callback(Object.assign(new Error('Temporary failure storing the message; try again'), { responseCode: 451 }));
            },
          );
        });
      },
    });
    server.on('error', (err) => this.onError(`local outbox SMTP error: ${err.message}`));
    await new Promise<void>((resolve, reject) => {
      server.server.once('error', reject);
      server.listen(port, '127.0.0.1', () => {
        server.server.off('error', reject);
        resolve();
      });
    });
    this.server = server;
    this.portNumber = (server.server.address() as AddressInfo).port;
  }

  async stop(): Promise<void> {
    const s = this.server;
    this.server = undefined;
    if (s) await new Promise<void>((resolve) => s.close(() => resolve()));
  }

  private async store(raw: Buffer, envelopeFrom: string, envelopeTo: string[]): Promise<void> {
    const parsed = await simpleParser(raw, { skipImageLinks: true, skipTextToHtml: true });
    await this.db.insert(mailMessages).values({
      envelopeFrom,
      envelopeTo,
      subject: parsed.subject ?? '',
      fromHeader: addressText(parsed.from),
      toHeader: addressText(parsed.to),
      textBody: parsed.text ?? '',
      htmlBody: typeof parsed.html === 'string' ? parsed.html : null,
      messageId: parsed.messageId ?? null,
      sizeBytes: raw.length,
      raw: raw.toString('utf8'),
    });
  }
}

function addressText(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return '';
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ');
}
