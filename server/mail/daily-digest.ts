import { and, asc, eq, gte, inArray, lt } from 'drizzle-orm';
import { roleAtLeast } from '../../shared/roles.js';
import { RESULTS_CAUTION } from '../../shared/params/result-caution.js';
import type { AppDb } from '../db/client.js';
import { jobs, settings, userPreferences, users } from '../db/schema/index.js';
import type { MailConfig } from './mail-config.js';
import type { Mailer } from './mailer.js';

const DIGEST_KEY = 'mail_digest';
const DAY_MS = 86_400_000;

interface DigestMark {
  /** Local calendar day (YYYY-MM-DD) of the last scheduled digest. */
  day: string;
  /** End of the period the last digest covered (ISO). */
  at: string;
}

export interface DigestResult {
  since: string;
  until: string;
  recipients: number;
  jobs: number;
}

/**
 * The morning digest: each person who opted in on their Profile gets one message listing the
 * jobs that ended since the previous digest (analysts: their own; operations and admins: all).
 * Nobody with nothing to report gets mail.
 */
export async function sendDigest(db: AppDb, mailer: Mailer, config: MailConfig, since: Date, until: Date): Promise<DigestResult> {
  const readers = await db
    .select({ id: users.id, email: users.email, displayName: users.displayName, role: users.role })
    .from(users)
    .innerJoin(userPreferences, eq(userPreferences.userId, users.id))
    .where(and(eq(userPreferences.dailyDigest, true), eq(users.disabled, false)));
  const ended = await db
    .select({ job: jobs, ownerName: users.displayName })
    .from(jobs)
    .innerJoin(users, eq(users.id, jobs.ownerId))
    .where(and(inArray(jobs.state, ['succeeded', 'failed', 'cancelled']), gte(jobs.finishedAt, since), lt(jobs.finishedAt, until)))
    .orderBy(asc(jobs.finishedAt));
  let recipients = 0;
  for (const r of readers) {
    const mine = roleAtLeast(r.role, 'operations') ? ended : ended.filter((e) => e.job.ownerId === r.id);
    if (mine.length === 0) continue;
    recipients++;
    const count = (s: string) => mine.filter((e) => e.job.state === s).length;
    const lines = [
      `Hello ${r.displayName},`,
      '',
      `${mine.length} job${mine.length === 1 ? '' : 's'} ended between ${since.toISOString()} and ${until.toISOString()}:`,
      `${count('succeeded')} succeeded, ${count('failed')} failed, ${count('cancelled')} cancelled.`,
      '',
      ...mine.map(({ job, ownerName }) => {
        const owner = roleAtLeast(r.role, 'operations') ? ` (${ownerName})` : '';
        const why = job.state === 'failed' && job.lastError ? ` - ${job.lastError}` : '';
        return `  #${job.id} ${job.state.padEnd(9)} ${job.name}${owner}${why}\n    ${config.publicUrl}/jobs/${job.id}`;
      }),
      '',
      RESULTS_CAUTION,
      '',
      '-- ',
      'You get this because the morning digest is on in your Nullsmith Profile. Turn it off there.',
    ];
    await mailer.send({
      kind: 'digest',
      to: [r.email],
      subject: `[Nullsmith] Overnight digest: ${mine.length} job${mine.length === 1 ? '' : 's'} ended`,
      text: lines.join('\n'),
      ref: `user:${r.id}`,
    });
  }
  return { since: since.toISOString(), until: until.toISOString(), recipients, jobs: ended.length };
}

/** Local calendar day, YYYY-MM-DD. */
const localDay = (d: Date) => `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;

async function readMark(db: AppDb): Promise<DigestMark | undefined> {
  const [row] = await db.select({ value: settings.value }).from(settings).where(eq(settings.key, DIGEST_KEY));
  return row?.value as DigestMark | undefined;
}

async function writeMark(db: AppDb, mark: DigestMark): Promise<void> {
  await db.insert(settings).values({ key: DIGEST_KEY, value: mark }).onConflictDoUpdate({ target: settings.key, set: { value: mark, updatedAt: new Date() } });
}

/**
 * Sends the digest once per local day at or after `digestHour`. The day's claim is written
 * before sending, so a restart later that morning does not send it twice.
 */
export async function digestIfDue(db: AppDb, mailer: Mailer, config: MailConfig, now = new Date()): Promise<DigestResult | undefined> {
  if (now.getHours() < config.digestHour) return undefined;
  const mark = await readMark(db);
  const today = localDay(now);
  if (mark?.day === today) return undefined;
  const since = mark ? new Date(mark.at) : new Date(now.getTime() - DAY_MS);
  await writeMark(db, { day: today, at: now.toISOString() });
  return sendDigest(db, mailer, config, since, now);
}

/** On demand (admin): the digest of everything since the last one, without waiting for morning. */
export async function digestNow(db: AppDb, mailer: Mailer, config: MailConfig, now = new Date()): Promise<DigestResult> {
  const mark = await readMark(db);
  const since = mark ? new Date(mark.at) : new Date(now.getTime() - DAY_MS);
  await writeMark(db, { day: mark?.day ?? '', at: now.toISOString() });
  return sendDigest(db, mailer, config, since, now);
}
