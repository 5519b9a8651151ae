import { Router } from 'express';
import { auditQuerySchema } from '../../shared/api/audit.js';
import { AUDIT_CSV_HEADER, allAudit, auditCsvLine, queryAudit } from '../admin/audit-query.js';
import { requireRole } from '../auth/require-role.js';
import type { AppContext } from '../context.js';

/**
 * /api/audit: the audit log (operations and admins).
 *   GET /              ?action=&actor=&target=&from=&to=&limit=&before=   newest first, paged
 *   GET /export.csv    the same filters, every matching entry as CSV (RFC 4180)
 */
export function auditRouter(ctx: AppContext): Router {
  const router = Router();
  router.use(requireRole('operations'));
  router.get('/', async (req, res) => {
    res.json(await queryAudit(ctx.db, auditQuerySchema.parse(req.query)));
  });
  router.get('/export.csv', async (req, res) => {
    const q = auditQuerySchema.parse(req.query);
    res.setHeader('Content-Type', 'text/csv; charset=utf-8');
    res.setHeader('Content-Disposition', `attachment; filename="nullsmith-audit-${new Date().toISOString().slice(0, 10)}.csv"`);
    res.write(`${AUDIT_CSV_HEADER}\r\n`);
    for await (const rows of allAudit(ctx.db, q)) {
      if (!res.write(rows.map((r) => `${auditCsvLine(r)}\r\n`).join(''))) await new Promise((r) => res.once('drain', r));
    }
    res.end();
  });
  return router;
}
