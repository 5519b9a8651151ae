import { Router } from 'express';
import { desc, eq, sql } from 'drizzle-orm';
import { z } from 'zod';
import { outboxQuerySchema, type OutboxResponse } from '../../shared/api/outbox.js';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';
import { mailMessages, mailSends } from '../db/schema/index.js';
import { HttpError, notFound } from '../http/http-error.js';
import { digestNow } from '../mail/daily-digest.js';

const idSchema = z.coerce.number({ error: 'The message id must be a whole number.' }).int('The message id must be a whole number.').positive('The message id must be a positive number.');

/**
 * /api/outbox: mail the server sent (admin).
 *   GET  /              messages the built-in receiver holds, newest first, and the delivery log
 *   GET  /:id/raw       one message exactly as received (message/rfc822)
 *   POST /digest        send the morning digest now (covers everything since the last one)
 */
export function outboxRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireRole('admin'));
  const mail = () => {
    const m = ctx.services.mail;
    if (!m) throw new HttpError(503, 'mail_unavailable', 'Mail is not running on this server; check the server log for a start-up error.');
    return m;
  };

  router.get('/', async (req, res) => {
    const q = outboxQuerySchema.parse(req.query);
    const filter = q.to ? sql`${mailMessages.envelopeTo}::text ilike ${`%${q.to.replace(/[\\%_]/g, (c) => `\\${c}`)}%`}` : undefined;
    const messages = await ctx.db.select().from(mailMessages).where(filter).orderBy(desc(mailMessages.id)).limit(q.limit);
    const sends = await ctx.db.select().from(mailSends).orderBy(desc(mailSends.id)).limit(q.limit);
    const body: OutboxResponse = {
      mode: mail().config.mode === 'local' ? 'local' : mail().mailer.relayLabel,
      messages: messages.map((m) => ({
        id: m.id,
        receivedAt: m.receivedAt.toISOString(),
        envelopeFrom: m.envelopeFrom,
        envelopeTo: m.envelopeTo,
        subject: m.subject,
        fromHeader: m.fromHeader,
        toHeader: m.toHeader,
        textBody: m.textBody,
        sizeBytes: m.sizeBytes,
      })),
      sends: sends.map((s) => ({
        id: s.id,
        createdAt: s.createdAt.toISOString(),
        kind: s.kind,
        toAddresses: s.toAddresses,
        subject: s.subject,
        state: s.state,
        attempts: s.attempts,
        lastError: s.lastError,
        sentAt: s.sentAt?.toISOString() ?? null,
        relay: s.relay,
      })),
    };
    res.json(body);
  });

  router.get('/:id/raw', async (req, res) => {
    const id = idSchema.parse(req.params.id);
    const [m] = await ctx.db.select({ raw: mailMessages.raw }).from(mailMessages).where(eq(mailMessages.id, id));
    if (!m) throw notFound(`There is no message ${id} in the outbox.`);
    res.setHeader('Content-Type', 'message/rfc822');
    res.setHeader('Content-Disposition', `attachment; filename="nullsmith-message-${id}.eml"`);
    res.send(m.raw);
  });

  router.post('/digest', async (_req, res) => {
    const m = mail();
    const result = await digestNow(ctx.db, m.mailer, m.config);
    await m.mailer.idle();
    res.json(result);
  });
  return router;
}
