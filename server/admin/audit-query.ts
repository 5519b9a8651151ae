import { and, desc, gte, ilike, like, lt, lte, or, type SQL } from 'drizzle-orm';
import type { AuditEntry, AuditQuery } from '../../shared/api/audit.js';
import type { AppDb } from '../db/client.js';
import { audit, type AuditRow } from '../db/schema/index.js';

/** LIKE patterns match user text literally. */
const literal = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

function where(q: AuditQuery, beforeId?: number): SQL | undefined {
  const parts: (SQL | undefined)[] = [];
  if (q.action) parts.push(or(like(audit.action, `${literal(q.action)}%`)));
  if (q.actor) parts.push(ilike(audit.actor, `%${literal(q.actor)}%`));
  if (q.target) parts.push(q.target.endsWith(':') ? like(audit.target, `${literal(q.target)}%`) : like(audit.target, literal(q.target)));
  if (q.from) parts.push(gte(audit.at, new Date(q.from)));
  if (q.to) parts.push(lte(audit.at, new Date(q.to)));
  if (beforeId) parts.push(lt(audit.id, beforeId));
  return parts.length ? and(...parts) : undefined;
}

export const toAuditEntry = (r: AuditRow): AuditEntry => ({
  id: r.id,
  at: r.at.toISOString(),
  userId: r.userId,
  actor: r.actor,
  action: r.action,
  target: r.target,
  before: r.before,
  after: r.after,
});

/** Newest first, one page; `nextBefore` continues the list. */
export async function queryAudit(db: AppDb, q: AuditQuery): Promise<{ entries: AuditEntry[]; nextBefore: number | null }> {
  const rows = await db.select().from(audit).where(where(q, q.before)).orderBy(desc(audit.id)).limit(q.limit + 1);
  const page = rows.slice(0, q.limit);
  return { entries: page.map(toAuditEntry), nextBefore: rows.length > q.limit ? page[page.length - 1].id : null };
}

/** Every matching entry, newest first, in batches (for the CSV export). */
export async function* allAudit(db: AppDb, q: AuditQuery, batch = 1000): AsyncGenerator<AuditRow[]> {
  let before: number | undefined = q.before;
  for (;;) {
    const rows = await db.select().from(audit).where(where(q, before)).orderBy(desc(audit.id)).limit(batch);
    if (!rows.length) return;
    yield rows;
    if (rows.length < batch) return;
    before = rows[rows.length - 1].id;
  }
}

/** RFC 4180 field: quoted when it holds a comma, quote, or line break; quotes doubled. */
export function csvField(v: unknown): string {
  const s = v === null || v === undefined ? '' : typeof v === 'string' ? v : JSON.stringify(v);
  // A leading = + - @ would run as a formula in spreadsheet programs (OWASP "CSV injection", common practice).
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

export const AUDIT_CSV_HEADER = 'id,at_utc,user_id,actor,action,target,before,after';
export const auditCsvLine = (r: AuditRow): string =>
  [r.id, r.at.toISOString(), r.userId, r.actor, r.action, r.target, r.before, r.after].map(csvField).join(',');
