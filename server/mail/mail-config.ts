import { z } from 'zod';

/**
 * Mail settings from the environment (README "Administration"). Without SMTP_HOST the server
 * starts its own SMTP receiver on loopback and keeps every message in the database (the
 * Outbox); with SMTP_HOST it sends through that relay instead.
 */
export interface MailConfig {
  /** 'local': our receiver; 'relay': a real SMTP server. */
  mode: 'local' | 'relay';
  relay?: { host: string; port: number; secure: boolean; user?: string; pass?: string; requireTls: boolean };
  /** Port of the local receiver (0 picks a free one; it only listens on 127.0.0.1). */
  receiverPort: number;
  from: string;
  /** Extra addresses told about every failed job, beside the operations accounts. */
  operationsTo: string[];
  /** Base URL used in links inside messages, e.g. https://nullsmith.lab.example. */
  publicUrl: string;
  /** Local hour (0-23) when the morning digest goes out. */
  digestHour: number;
  /** Send attempts per message and the first retry delay (doubling). */
  attempts: number;
  retryDelayMs: number;
}

const emailList = z
  .string()
  .transform((s) => s.split(',').map((p) => p.trim()).filter(Boolean))
  .pipe(z.array(z.email('must be a comma-separated list of e-mail addresses')));

const mailEnv = z.object({
  SMTP_HOST: z.string().min(1).optional(),
  SMTP_PORT: z.coerce.number({ error: 'must be a port number, e.g. 587' }).int('must be a whole number').min(1, 'must be 1 to 65535').max(65535, 'must be 1 to 65535').optional(),
  SMTP_SECURE: z.enum(['on', 'off'], { error: 'must be "on" (TLS from the first byte, usually port 465) or "off" (STARTTLS when offered)' }).default('off'),
  SMTP_REQUIRE_TLS: z.enum(['on', 'off'], { error: 'must be "on" or "off"' }).default('off'),
  SMTP_USER: z.string().optional(),
  SMTP_PASS: z.string().optional(),
  MAIL_FROM: z.string().min(3, 'must be a sender such as "Nullsmith <nullsmith@lab.example>"').default('Nullsmith <nullsmith@localhost>'),
  MAIL_OPERATIONS_TO: emailList.default([]),
  MAIL_RECEIVER_PORT: z.coerce.number({ error: 'must be a port number (0 picks a free one)' }).int('must be a whole number').min(0, 'must be 0 to 65535').max(65535, 'must be 0 to 65535').default(0),
  PUBLIC_URL: z.url({ error: 'must be the address people open Nullsmith at, e.g. https://nullsmith.lab.example' }).optional(),
  MAIL_DIGEST_HOUR: z.coerce.number({ error: 'must be an hour from 0 to 23' }).int('must be a whole hour').min(0, 'must be 0 to 23').max(23, 'must be 0 to 23').default(7),
  MAIL_ATTEMPTS: z.coerce.number({ error: 'must be a whole number' }).int('must be a whole number').min(1, 'must be at least 1').max(10, 'must be at most 10').default(4),
  MAIL_RETRY_MS: z.coerce.number({ error: 'must be milliseconds' }).int('must be a whole number').min(0, 'must be 0 or more').default(2_000),
});

/** Reads mail settings; throws one Error naming every bad variable and what to set. */
export function loadMailConfig(env: NodeJS.ProcessEnv, fallbackUrl: string): MailConfig {
  const cleaned = Object.fromEntries(Object.keys(mailEnv.shape).map((k) => [k, env[k] === '' ? undefined : env[k]]));
  const parsed = mailEnv.safeParse(cleaned);
  if (!parsed.success) {
    throw new Error(
      `Mail settings are not valid: ${parsed.error.issues.map((i) => `${String(i.path[0])}=${JSON.stringify(env[String(i.path[0])] ?? '')} ${i.message}`).join('; ')}.`,
    );
  }
  const e = parsed.data;
  if ((e.SMTP_USER && !e.SMTP_PASS) || (!e.SMTP_USER && e.SMTP_PASS)) {
    throw new Error('Mail settings are not valid: set both SMTP_USER and SMTP_PASS, or neither.');
  }
  return {
    mode: e.SMTP_HOST ? 'relay' : 'local',
    relay: e.SMTP_HOST
      ? { host: e.SMTP_HOST, port: e.SMTP_PORT ?? (e.SMTP_SECURE === 'on' ? 465 : 587), secure: e.SMTP_SECURE === 'on', user: e.SMTP_USER, pass: e.SMTP_PASS, requireTls: e.SMTP_REQUIRE_TLS === 'on' }
      : undefined,
    receiverPort: e.MAIL_RECEIVER_PORT,
    from: e.MAIL_FROM,
    operationsTo: e.MAIL_OPERATIONS_TO,
    publicUrl: (e.PUBLIC_URL ?? fallbackUrl).replace(/\/+$/, ''),
    digestHour: e.MAIL_DIGEST_HOUR,
    attempts: e.MAIL_ATTEMPTS,
    retryDelayMs: e.MAIL_RETRY_MS,
  };
}
