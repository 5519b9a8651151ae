import os from 'node:os';
import path from 'node:path';
import { z } from 'zod';

/**
 * Start-up configuration from environment variables, validated once. A bad value stops the
 * server with one line per problem naming the variable, what is wrong, and what to set.
 */
const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('production'),
  PORT: z.coerce
    .number({ error: 'must be a whole number from 0 to 65535 (0 picks a free port)' })
    .int('must be a whole number from 0 to 65535 (0 picks a free port)')
    .min(0, 'must be 0 or more')
    .max(65535, 'must be at most 65535')
    .default(8080),
  HOST: z.string().min(1, 'must name an interface address, e.g. 127.0.0.1').default('127.0.0.1'),
  DATA_DIR: z.string().min(1, 'must be a folder path').default('./data'),
  DATABASE_URL: z
    .string()
    .regex(/^postgres(ql)?:\/\//, 'must be a postgres:// or postgresql:// URL, or unset for the embedded database')
    .optional(),
  SESSION_SECRET: z.string().min(32, 'must be at least 32 characters; unset it to have one generated and stored').optional(),
  LOG_LEVEL: z.enum(['error', 'warn', 'info', 'http', 'debug']).default('info'),
  WORKER_CONCURRENCY: z.coerce
    .number({ error: 'must be a whole number of compute children, 1 or more' })
    .int('must be a whole number')
    .min(1, 'must be at least 1')
    .default(Math.max(1, os.cpus().length - 1)),
  DEMO_DATA: z.enum(['on', 'off'], { error: 'must be "on" or "off"' }).default('on'),
  RESULTS_DIR: z.string().min(1, 'must be a folder path (shared by every node when scaling out)').optional(),
  TRUST_PROXY: z
    .string()
    .regex(/^(off|on|\d{1,2}|[0-9a-fA-F.:/, ]+)$/, 'must be "off", "on", a hop count such as 1, or proxy addresses/CIDRs separated by commas')
    .default('off'),
  COOKIE_SECURE: z.enum(['on', 'off', 'auto'], { error: 'must be "on" (HTTPS only), "off", or "auto" (Secure whenever the request arrived over HTTPS)' }).default('auto'),
  SESSION_MAX_AGE_HOURS: z.coerce
    .number({ error: 'must be a number of hours, e.g. 12' })
    .positive('must be more than 0 hours')
    .max(24 * 90, 'must be at most 2160 hours (90 days)')
    .default(12),
});

export type AppConfig = {
  nodeEnv: 'development' | 'production' | 'test';
  port: number;
  host: string;
  dataDir: string;
  databaseUrl?: string;
  sessionSecret?: string;
  logLevel: string;
  workerConcurrency: number;
  demoData: boolean;
  /** Job result files: DATA_DIR/results unless RESULTS_DIR names a path shared by all nodes. */
  resultsDir: string;
  /** Express 'trust proxy' value: false, true, a hop count or a list of proxy addresses. */
  trustProxy: boolean | number | string;
  /** Secure flag of the session and CSRF cookies; 'auto' sets it when the request came over HTTPS (needs TRUST_PROXY behind a proxy). */
  cookieSecure: boolean | 'auto';
  sessionMaxAgeMs: number;
};

export class ConfigError extends Error {
  constructor(readonly problems: string[]) {
    super(`Nullsmith cannot start; fix these settings:\n${problems.map((p) => `  - ${p}`).join('\n')}`);
    this.name = 'ConfigError';
  }
}

/** Reads and validates the environment; throws ConfigError listing every bad variable. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): AppConfig {
  const blankToUndefined = Object.fromEntries(Object.entries(env).map(([k, v]) => [k, v === '' ? undefined : v]));
  const parsed = envSchema.safeParse(blankToUndefined);
  if (!parsed.success) {
    throw new ConfigError(
      parsed.error.issues.map((i) => `${String(i.path[0])}=${JSON.stringify(env[String(i.path[0])] ?? '')}: ${i.message}`),
    );
  }
  const e = parsed.data;
  return {
    nodeEnv: e.NODE_ENV,
    port: e.PORT,
    host: e.HOST,
    dataDir: path.resolve(e.DATA_DIR),
    databaseUrl: e.DATABASE_URL,
    sessionSecret: e.SESSION_SECRET,
    logLevel: e.LOG_LEVEL,
    workerConcurrency: e.WORKER_CONCURRENCY,
    demoData: e.DEMO_DATA === 'on',
    resultsDir: path.resolve(e.RESULTS_DIR ?? path.join(e.DATA_DIR, 'results')),
    trustProxy: parseTrustProxy(e.TRUST_PROXY),
    cookieSecure: e.COOKIE_SECURE === 'auto' ? 'auto' : e.COOKIE_SECURE === 'on',
    sessionMaxAgeMs: Math.round(e.SESSION_MAX_AGE_HOURS * 3_600_000),
  };
}

function parseTrustProxy(value: string): boolean | number | string {
  if (value === 'off') return false;
  if (value === 'on') return true;
  if (/^\d{1,2}$/.test(value)) return Number(value);
  return value;
}
