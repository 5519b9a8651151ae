import * as z from 'zod';

/** A message held by the built-in SMTP receiver (the Outbox). */
export const outboxMessageSchema = z.object({
  id: z.number().int(),
  receivedAt: z.string(),
  envelopeFrom: z.string(),
  envelopeTo: z.array(z.string()),
  subject: z.string(),
  fromHeader: z.string(),
  toHeader: z.string(),
  textBody: z.string(),
  sizeBytes: z.number().int(),
});
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;

/** One row of the mailer's delivery log. */
export const mailSendSchema = z.object({
  id: z.number().int(),
  createdAt: z.string(),
  kind: z.string(),
  toAddresses: z.array(z.string()),
  subject: z.string(),
  state: z.enum(['pending', 'sent', 'failed']),
  attempts: z.number().int(),
  lastError: z.string().nullable(),
  sentAt: z.string().nullable(),
  relay: z.string(),
});
export type MailSend = z.infer<typeof mailSendSchema>;

export const outboxQuerySchema = z.object({
  /** Substring of a recipient address. */
  to: z.string().trim().max(200, 'to is at most 200 characters.').optional(),
  limit: z.coerce.number({ error: 'limit must be a number.' }).int('limit must be a whole number.').min(1, 'limit must be at least 1.').max(200, 'limit is at most 200.').default(50),
});

export const outboxResponseSchema = z.object({
  /** 'local' when the built-in receiver takes the mail, else the relay's host:port. */
  mode: z.string(),
  messages: z.array(outboxMessageSchema),
  sends: z.array(mailSendSchema),
});
export type OutboxResponse = z.infer<typeof outboxResponseSchema>;
