import winston from 'winston';
import type { AppConfig } from './config.js';

export type Logger = winston.Logger;

/**
 * One logger per process. Production writes one JSON object per line (for log shippers);
 * development and test write short readable lines. Never pass passwords, cookies, tokens or
 * request bodies to it: callers log ids, paths and counts only.
 */
export function createLogger(config: Pick<AppConfig, 'nodeEnv' | 'logLevel'>): Logger {
  const readable = winston.format.combine(
    winston.format.timestamp({ format: 'HH:mm:ss.SSS' }),
    winston.format.printf(({ timestamp, level, message, ...meta }) => {
      const shown = Object.fromEntries(Object.entries(meta).filter(([, v]) => v !== undefined));
      const rest = Object.keys(shown).length ? ` ${JSON.stringify(shown)}` : '';
      return `${String(timestamp)} ${level} ${String(message)}${rest}`;
    }),
  );
  const json = winston.format.combine(winston.format.timestamp(), winston.format.errors({ stack: true }), winston.format.json());
  return winston.createLogger({
    level: config.logLevel,
    format: config.nodeEnv === 'production' ? json : readable,
    // stderr keeps stdout free for the one "listening" line that scripts and tests parse.
    transports: [new winston.transports.Console({ stderrLevels: ['error', 'warn', 'info', 'http', 'verbose', 'debug', 'silly'] })],
  });
}
