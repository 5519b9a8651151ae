import { bigserial, index, integer, jsonb, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/**
 * Every message the built-in SMTP receiver accepted (the Outbox admins read). Filled only in
 * local mode, over a real SMTP connection from our own mailer; with a real relay configured,
 * mail leaves the building and only `mail_sends` records it.
 */
export const mailMessages = pgTable(
  'mail_messages',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    receivedAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    /** SMTP envelope (MAIL FROM / RCPT TO), which is what was really delivered. */
    envelopeFrom: text().notNull(),
    envelopeTo: jsonb().$type<string[]>().notNull(),
    /** Parsed headers and bodies, for display. */
    subject: text().notNull().default(''),
    fromHeader: text().notNull().default(''),
    toHeader: text().notNull().default(''),
    textBody: text().notNull().default(''),
    htmlBody: text(),
    messageId: text(),
    sizeBytes: integer().notNull(),
    /** The message exactly as received (RFC 5322), for download. */
    raw: text().notNull(),
  },
  (t) => [index('mail_messages_received_idx').on(t.receivedAt)],
);

export type MailMessageRow = typeof mailMessages.$inferSelect;

/** What the mailer tried to send, how often, and how it ended (retries and failures are logged here). */
export const MAIL_KINDS = ['job-outcome', 'digest', 'invite', 'password-reset'] as const;
export const MAIL_SEND_STATES = ['pending', 'sent', 'failed'] as const;

export const mailSends = pgTable(
  'mail_sends',
  {
    id: bigserial({ mode: 'number' }).primaryKey(),
    createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
    kind: text({ enum: MAIL_KINDS }).notNull(),
    toAddresses: jsonb().$type<string[]>().notNull(),
    subject: text().notNull(),
    state: text({ enum: MAIL_SEND_STATES }).notNull().default('pending'),
    attempts: integer().notNull().default(0),
    lastError: text(),
    sentAt: timestamp({ withTimezone: true }),
    messageId: text(),
    /** 'local receiver' or the relay's host:port. */
    relay: text().notNull(),
    /** e.g. 'job:42' or 'user:7', to find the mail of one thing. */
    subjectRef: text(),
  },
  (t) => [index('mail_sends_created_idx').on(t.createdAt), index('mail_sends_ref_idx').on(t.subjectRef)],
);

export type MailSendRow = typeof mailSends.$inferSelect;
