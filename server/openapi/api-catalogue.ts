import { z } from 'zod';
import { adminSettingsPatchSchema, adminSettingsResponseSchema } from '../../shared/api/admin-settings.js';
import { arrayRequestSchema } from '../../shared/api/arrays.js';
import { auditListResponseSchema, auditQuerySchema } from '../../shared/api/audit.js';
import { loginRequestSchema, sessionResponseSchema } from '../../shared/api/auth.js';
import { healthResponseSchema } from '../../shared/api/health.js';
import { cancelBatchResponseSchema, jobBatchSchema, submitBatchResponseSchema, submitBatchSchema } from '../../shared/api/job-batches.js';
import { jobSchema, listJobsQuerySchema, queueStatusSchema, setPrioritySchema, submitJobSchema, workerNodeSchema } from '../../shared/api/jobs.js';
import { outboxQuerySchema, outboxResponseSchema } from '../../shared/api/outbox.js';
import { profilePatchSchema, profileSchema } from '../../shared/api/profile.js';
import { archiveRegisterSchema, archiveRootRequestSchema, recordingListQuerySchema, recordingPatchSchema } from '../../shared/api/recordings.js';
import { createdTokenSchema, createTokenSchema, apiTokenSchema, tokenListResponseSchema } from '../../shared/api/tokens.js';
import { createUploadSchema } from '../../shared/api/uploads.js';
import { accountLinkInfoSchema, createUserSchema, resetPasswordSchema, updateUserSchema, useAccountLinkSchema, userActionResponseSchema } from '../../shared/api/user-admin.js';
import { userListResponseSchema, userSummarySchema } from '../../shared/api/users.js';
import type { Role } from '../../shared/roles.js';

/** One API operation as the OpenAPI document describes it. */
export interface ApiOperation {
  method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  /** Express pattern as mounted, e.g. /api/jobs/:id/cancel. */
  path: string;
  tag: string;
  summary: string;
  /** Least role; 'public' needs no sign-in. */
  access: Role | 'public';
  /** API tokens may call it (read scope: GET only; submit scope: also changes). */
  tokens?: boolean;
  query?: z.ZodType;
  body?: z.ZodType;
  /** 'multipart' bodies are described in words (chunk uploads). */
  bodyKind?: 'json' | 'multipart';
  response?: z.ZodType;
  /** Success status (default 200) and content type for non-JSON answers. */
  status?: number;
  produces?: 'text/csv' | 'message/rfc822' | 'none';
}

const op = (method: ApiOperation['method'], path: string, tag: string, access: ApiOperation['access'], summary: string, more: Partial<ApiOperation> = {}): ApiOperation => ({
  method,
  path,
  tag,
  access,
  summary,
  tokens: access !== 'public' && !/^\/api\/(tokens|users|settings|retention|profile|outbox|auth)/.test(path) ? true : method === 'GET' && access !== 'public',
  ...more,
});

const jobAnswer = z.object({ job: jobSchema });
const csvDownloadQuery = z.object({
  fromWindow: z.number().int().min(0).optional(),
  toWindow: z.number().int().min(0).optional(),
  beams: z.string().describe('comma-separated beam indexes, e.g. 0,3').optional(),
  bins: z.string().describe('comma-separated bin indexes').optional(),
  comments: z.enum(['on', 'off']).optional(),
});
const plotRange = z.object({ fromWindow: z.number().int().min(0).optional(), toWindow: z.number().int().min(0).optional() });

/**
 * Every API route with what it takes and answers. The OpenAPI document is generated from this
 * list and the zod schemas in shared/api; tests/server/openapi.test.ts compares it with the
 * routers' real route list, so a new route without an entry here fails the build.
 */
export const API_CATALOGUE: ApiOperation[] = [
  op('GET', '/api/health', 'Service', 'public', 'Liveness, version and database kind.', { response: healthResponseSchema }),
  op('GET', '/api/openapi.json', 'Service', 'public', 'This document.'),

  op('POST', '/api/auth/login', 'Sign-in', 'public', 'Sign in with e-mail and password; sets the session cookie.', { body: loginRequestSchema, response: sessionResponseSchema }),
  op('POST', '/api/auth/logout', 'Sign-in', 'public', 'Sign out (ends the session).', { status: 204, produces: 'none' }),
  op('GET', '/api/auth/me', 'Sign-in', 'analyst', 'The signed-in user.', { response: sessionResponseSchema }),

  op('GET', '/api/profile', 'Profile', 'analyst', 'Your profile and mail choices.', { response: profileSchema }),
  op('PATCH', '/api/profile', 'Profile', 'analyst', 'Turn the morning digest on or off; change your display name.', { body: profilePatchSchema, response: profileSchema }),
  op('GET', '/api/tokens', 'API tokens', 'analyst', 'Your API tokens (never their secrets).', { response: tokenListResponseSchema }),
  op('POST', '/api/tokens', 'API tokens', 'analyst', 'Create an API token; the secret appears in this answer only.', { body: createTokenSchema, response: createdTokenSchema, status: 201 }),
  op('DELETE', '/api/tokens/:id', 'API tokens', 'analyst', 'Revoke a token (admins: anyone\'s).', { response: z.object({ token: apiTokenSchema }) }),
  op('GET', '/api/account-links/:secret', 'Profile', 'public', 'Who a one-time invitation or reset link is for.', { response: accountLinkInfoSchema }),
  op('POST', '/api/account-links/:secret', 'Profile', 'public', 'Choose a password through a one-time link (uses it up).', { body: useAccountLinkSchema, status: 204, produces: 'none' }),

  op('POST', '/api/uploads', 'Uploads', 'analyst', 'Open a resumable upload; the answer gives the chunk size and count.', { body: createUploadSchema, status: 201 }),
  op('GET', '/api/uploads', 'Uploads', 'analyst', 'Your unfinished uploads.'),
  op('GET', '/api/uploads/:id', 'Uploads', 'analyst', 'One upload with the chunks the server holds (resume from here).'),
  op('POST', '/api/uploads/:id/chunks/:index', 'Uploads', 'analyst', 'Send one chunk: multipart form with field "sha256" (hex of the chunk) then file part "chunk".', { bodyKind: 'multipart' }),
  op('POST', '/api/uploads/:id/complete', 'Uploads', 'analyst', 'All chunks in: the file becomes a recording and is inspected.', { status: 202 }),
  op('DELETE', '/api/uploads/:id', 'Uploads', 'analyst', 'Cancel an upload; the partial file is removed.', { status: 204, produces: 'none' }),

  op('GET', '/api/recordings', 'Recordings', 'analyst', 'Recordings, sorted, filtered and paged.', { query: recordingListQuerySchema }),
  op('GET', '/api/recordings/:id', 'Recordings', 'analyst', 'One recording with header facts, channel QC and the jobs that used it.'),
  op('PATCH', '/api/recordings/:id', 'Recordings', 'analyst', 'Rename a recording or link it to an array.', { body: recordingPatchSchema }),
  op('DELETE', '/api/recordings/:id', 'Recordings', 'analyst', 'Delete a recording (archive files stay in place).', { status: 204, produces: 'none' }),
  op('POST', '/api/recordings/:id/inspect', 'Recordings', 'analyst', 'Inspect a recording again.'),

  op('GET', '/api/arrays', 'Arrays', 'analyst', 'Array descriptions.'),
  op('GET', '/api/arrays/:id', 'Arrays', 'analyst', 'One array with its geometry.'),
  op('GET', '/api/arrays/:id/versions', 'Arrays', 'analyst', 'The versions of an array.'),
  op('POST', '/api/arrays', 'Arrays', 'analyst', 'Describe a new array.', { body: arrayRequestSchema, status: 201 }),
  op('PUT', '/api/arrays/:id', 'Arrays', 'analyst', 'Change an array (a version a job used becomes a new version).', { body: arrayRequestSchema }),
  op('DELETE', '/api/arrays/:id', 'Arrays', 'operations', 'Delete an array.', { status: 204, produces: 'none' }),

  op('GET', '/api/archives', 'Archives', 'analyst', 'Archive roots (server folders registered in place).'),
  op('POST', '/api/archives', 'Archives', 'admin', 'Add an archive root.', { body: archiveRootRequestSchema, status: 201 }),
  op('DELETE', '/api/archives/:id', 'Archives', 'admin', 'Remove an archive root that has no recordings.', { status: 204, produces: 'none' }),
  op('GET', '/api/archives/:id/browse', 'Archives', 'analyst', 'List one folder under a root (?path=).'),
  op('POST', '/api/archives/:id/register', 'Archives', 'analyst', 'Register files under a root as recordings, in place.', { body: archiveRegisterSchema, status: 201 }),

  op('POST', '/api/jobs', 'Jobs', 'analyst', 'Queue a beamforming job.', { body: submitJobSchema, status: 201 }),
  op('POST', '/api/jobs/batch', 'Jobs', 'analyst', 'Queue one job per recording (a list of ids or an archive folder selection) with the same parameters; refused whole if any recording fails its checks.', { body: submitBatchSchema, response: submitBatchResponseSchema, status: 201 }),
  op('GET', '/api/jobs/batches/:id', 'Jobs', 'analyst', 'One batch with how many of its jobs are in each state and its window progress.', { response: z.object({ batch: jobBatchSchema }) }),
  op('POST', '/api/jobs/batches/:id/cancel', 'Jobs', 'analyst', 'Cancel every job of a batch that has not ended: queued ones at once, running ones after their window in progress (finished windows kept). The batch owner or the operations role.', { response: cancelBatchResponseSchema }),
  op('GET', '/api/jobs', 'Jobs', 'analyst', 'Jobs, filtered, sorted and paged.', { query: listJobsQuerySchema }),
  op('GET', '/api/jobs/:id', 'Jobs', 'analyst', 'One job with its state history.'),
  op('POST', '/api/jobs/:id/cancel', 'Jobs', 'analyst', 'Cancel a job (owner or operations); a running job stops after its current window.', { response: jobAnswer }),
  op('PATCH', '/api/jobs/:id/priority', 'Jobs', 'operations', 'Change the priority of a waiting job.', { body: setPrioritySchema, response: jobAnswer }),
  op('POST', '/api/jobs/:id/rerun', 'Jobs', 'analyst', 'Queue a job again, optionally with changed parameters.', { status: 201 }),
  op('GET', '/api/jobs/:id/weights.csv', 'Results', 'analyst', 'Per-window adaptive weights as CSV.', { query: csvDownloadQuery, produces: 'text/csv' }),
  op('GET', '/api/jobs/:id/sinr.csv', 'Results', 'analyst', 'Per-window SINR, WNG, power and eigenvalue diagnostics as CSV.', { query: csvDownloadQuery, produces: 'text/csv' }),
  op('GET', '/api/results/:id/weights.csv', 'Results', 'analyst', 'Weights CSV with filters, optionally gzip-compressed (?gzip=on).', { query: csvDownloadQuery.extend({ gzip: z.enum(['on', 'off']).optional() }), produces: 'text/csv' }),
  op('GET', '/api/results/:id/sinr.csv', 'Results', 'analyst', 'Diagnostics CSV with filters, optionally gzip-compressed (?gzip=on).', { query: csvDownloadQuery.extend({ gzip: z.enum(['on', 'off']).optional() }), produces: 'text/csv' }),
  op('GET', '/api/plots/:id/run', 'Results', 'analyst', 'The run description of a job\'s results.'),
  op('GET', '/api/plots/:id/windows', 'Results', 'analyst', 'Per-window broadband summaries (bearing-time map, SINR track).', { query: plotRange }),
  op('GET', '/api/plots/:id/eigen', 'Results', 'analyst', 'One window\'s eigen spectrum (?window=&bin=).'),
  op('GET', '/api/plots/:id/weights', 'Results', 'analyst', 'One saved beam\'s weights (?window=&bin=&beam=).'),
  op('GET', '/api/plots/:id/table', 'Results', 'analyst', 'The per-window table.', { query: plotRange }),

  op('GET', '/api/queue', 'Queue', 'analyst', 'Whether the queue is paused, and job counts per state.', { response: queueStatusSchema }),
  op('POST', '/api/queue/pause', 'Queue', 'operations', 'Pause the queue: running jobs finish, no new ones start.'),
  op('POST', '/api/queue/resume', 'Queue', 'operations', 'Resume the queue.'),
  op('GET', '/api/workers', 'Queue', 'operations', 'Nodes with heartbeat, concurrency and current jobs.', { response: z.object({ workers: z.array(workerNodeSchema) }).loose() }),
  op('POST', '/api/workers/:id/drain', 'Queue', 'operations', 'Drain a node (finish running jobs, claim no new ones) or undrain it.'),

  op('GET', '/api/users', 'Administration', 'admin', 'Every account.', { response: userListResponseSchema }),
  op('POST', '/api/users', 'Administration', 'admin', 'Create an account (with password) or invite one (without: a one-time link is mailed).', { body: createUserSchema, response: userActionResponseSchema, status: 201 }),
  op('PATCH', '/api/users/:id', 'Administration', 'admin', 'Change role, disable or enable, rename. The last enabled admin is protected.', { body: updateUserSchema, response: z.object({ user: userSummarySchema }) }),
  op('POST', '/api/users/:id/reset-password', 'Administration', 'admin', 'Set a password, or (empty body) mail a one-time reset link.', { body: resetPasswordSchema, response: userActionResponseSchema }),
  op('GET', '/api/settings', 'Administration', 'admin', 'Run-time settings and where each value comes from.', { response: adminSettingsResponseSchema }),
  op('PATCH', '/api/settings', 'Administration', 'admin', 'Change settings; they apply without a restart.', { body: adminSettingsPatchSchema, response: adminSettingsResponseSchema }),
  op('GET', '/api/retention', 'Administration', 'operations', 'Last retention sweep and pinned jobs.'),
  op('POST', '/api/retention/sweep', 'Administration', 'admin', 'Delete expired results now.'),
  op('PUT', '/api/retention/pins/:jobId', 'Administration', 'operations', 'Keep a job\'s results whatever their age.', { body: z.object({ note: z.string().max(500).optional() }), status: 204, produces: 'none' }),
  op('DELETE', '/api/retention/pins/:jobId', 'Administration', 'operations', 'Stop keeping a job\'s results.', { status: 204, produces: 'none' }),
  op('GET', '/api/audit', 'Administration', 'operations', 'The audit log, newest first, filtered and paged.', { query: auditQuerySchema, response: auditListResponseSchema }),
  op('GET', '/api/audit/export.csv', 'Administration', 'operations', 'The filtered audit log as CSV.', { query: auditQuerySchema, produces: 'text/csv' }),
  op('GET', '/api/outbox', 'Administration', 'admin', 'Mail held by the built-in receiver, and the delivery log.', { query: outboxQuerySchema, response: outboxResponseSchema }),
  op('GET', '/api/outbox/:id/raw', 'Administration', 'admin', 'One message as received.', { produces: 'message/rfc822' }),
  op('POST', '/api/outbox/digest', 'Administration', 'admin', 'Send the morning digest now.'),
];
