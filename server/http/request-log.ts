import type { RequestHandler } from 'express';
import type { Logger } from '../logger.js';

/**
 * One log line per finished request: method, path (never the query string, which may carry
 * tokens), status, milliseconds and the user id. API calls log at 'info', static files at 'http'.
 */
export function requestLog(logger: Logger): RequestHandler {
  return (req, res, next) => {
    const started = process.hrtime.bigint();
    res.on('finish', () => {
      const ms = Number(process.hrtime.bigint() - started) / 1e6;
      const path = req.originalUrl.split('?')[0];
      const level = path.startsWith('/api/') ? 'info' : 'http';
      logger.log(level, `${req.method} ${path} ${res.statusCode} ${ms.toFixed(1)}ms`, { userId: req.user?.id });
    });
    next();
  };
}
