// Every table of the product, one file per table or close family. Add one export line per new file,
// then run `npm run db:generate` to write the SQL migration into drizzle/.
export * from './users.js';
export * from './sessions.js';
export * from './settings.js';
export * from './jobs.js';
export * from './job-events.js';
export * from './nodes.js';
export * from './audit.js';
export * from './queue-state.js';
export * from './archive-roots.js';
export * from './arrays.js';
export * from './recordings.js';
export * from './uploads.js';
export * from './mail.js';
export * from './api-tokens.js';
export * from './account-links.js';
export * from './user-preferences.js';
export * from './retention.js';
export * from './live-changes.js';
export * from './job-batches.js';
export * from './login-failures.js';
