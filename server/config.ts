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
  };
}
