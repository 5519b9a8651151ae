import { and, asc, desc, eq, inArray, sql, type SQL } from 'drizzle-orm';
import type { ListJobsQuery } from '../../shared/api/jobs.js';
import type { AppDb } from '../db/client.js';
import { jobs, type JobRow } from '../db/schema/jobs.js';
import { users } from '../db/schema/users.js';

/** Server-side filter (state, owner), sort and pagination for the jobs table. */
export async function listJobs(
  db: AppDb,
  q: ListJobsQuery,
  viewerId: number,
): Promise<{ items: (JobRow & { ownerName: string })[]; total: number }> {
  const where: SQL[] = [];
  if (q.state) where.push(inArray(jobs.state, Array.isArray(q.state) ? q.state : [q.state]));
  if (q.batch !== undefined) where.push(eq(jobs.batchId, q.batch));
  if (q.owner !== undefined) where.push(eq(jobs.ownerId, q.owner === 'me' ? viewerId : q.owner));
  const cond = where.length ? and(...where) : undefined;
  const column = { created: jobs.createdAt, priority: jobs.priority, state: jobs.state, name: jobs.name, updated: jobs.updatedAt }[q.sort];
  const dir = q.order === 'asc' ? asc : desc;
  const rows = await db
    .select({ job: jobs, ownerName: users.displayName })
    .from(jobs)
    .innerJoin(users, eq(users.id, jobs.ownerId))
    .where(cond)
    .orderBy(dir(column), dir(jobs.id))
    .limit(q.limit)
    .offset(q.offset);
  const [{ n }] = await db.select({ n: sql<number>`count(*)::int` }).from(jobs).where(cond);
  return { items: rows.map((r) => ({ ...r.job, ownerName: r.ownerName })), total: Number(n) };
}
