import { and, eq } from 'drizzle-orm';
import type { JobDto } from '../../shared/api/jobs.js';
import { RESULTS_CAUTION } from '../../shared/params/result-caution.js';
import type { AppDb } from '../db/client.js';
import { mailSends, recordings, users } from '../db/schema/index.js';
import type { JobStateEvent } from '../nodes/queue-events.js';
import type { MailConfig } from './mail-config.js';
import { operationsAddresses, uniqueAddresses } from './mail-recipients.js';
import type { Mailer, OutgoingMail } from './mailer.js';

const OUTCOMES = new Set(['succeeded', 'failed', 'cancelled']);

/**
 * Mails a job's owner when it succeeds, fails or is cancelled; failures also go to operations.
 * Runs on `job:state` events. At most one outcome mail per job, even when the event arrives
 * twice (a reaper and a node may both report the end).
 */
export async function mailJobOutcome(db: AppDb, mailer: Mailer, config: MailConfig, event: JobStateEvent): Promise<void> {
  if (!OUTCOMES.has(event.state)) return;
  const ref = `job:${event.jobId}`;
  const [already] = await db
    .select({ id: mailSends.id })
    .from(mailSends)
    .where(and(eq(mailSends.kind, 'job-outcome'), eq(mailSends.subjectRef, ref)))
    .limit(1);
  if (already) return;
  const job = event.job;
  const [owner] = await db.select({ email: users.email, displayName: users.displayName, disabled: users.disabled }).from(users).where(eq(users.id, job.ownerId));
  const to = owner && !owner.disabled ? [owner.email] : [];
  if (event.state === 'failed') to.push(...(await operationsAddresses(db, config.operationsTo)));
  const recipients = uniqueAddresses(to);
  if (recipients.length === 0) return;
  const recording = job.recordingId
    ? (await db.select({ name: recordings.name }).from(recordings).where(eq(recordings.id, job.recordingId)))[0]?.name
    : undefined;
  await mailer.send(composeJobOutcome(job, owner?.displayName ?? `user ${job.ownerId}`, recording, config.publicUrl, recipients, ref));
}

export function composeJobOutcome(job: JobDto, ownerName: string, recording: string | undefined, publicUrl: string, to: string[], ref: string): OutgoingMail {
  const verb = job.state === 'succeeded' ? 'finished' : job.state === 'failed' ? 'FAILED' : 'was cancelled';
  const lines = [
    `Job ${job.id} "${job.name}" ${verb}.`,
    '',
    `Owner:      ${ownerName}`,
    `Recording:  ${recording ?? (job.recordingId === null ? 'none' : `recording ${job.recordingId}`)}`,
    `State:      ${job.state}${job.partial ? ' (partial: finished windows were kept)' : ''}`,
    `Windows:    ${job.windowsDone}${job.totalWindows !== null ? ` of ${job.totalWindows}` : ''}`,
    `Attempts:   ${job.attempts} of ${job.maxAttempts}`,
    `Submitted:  ${job.createdAt}`,
    `Started:    ${job.startedAt ?? 'never'}`,
    `Ended:      ${job.finishedAt ?? job.updatedAt}`,
  ];
  if (job.state === 'failed' && job.lastError) lines.push('', 'Reason:', `  ${job.lastError}`);
  lines.push('', `Open the job: ${publicUrl}/jobs/${job.id}`);
  if (job.state === 'succeeded' || job.partial) lines.push('', RESULTS_CAUTION);
  lines.push('', '-- ', 'Sent by Nullsmith. Change which mail you get on your Profile page.');
  return { kind: 'job-outcome', to, subject: `[Nullsmith] Job ${job.id} "${job.name}" ${job.state}`, text: lines.join('\n'), ref };
}
