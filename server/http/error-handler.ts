import type { ErrorRequestHandler } from 'express';
import { ZodError } from 'zod';
import type { ApiError } from '../../shared/api/error.js';
import type { Logger } from '../logger.js';
import { HttpError } from './http-error.js';

/** Errors thrown by body-parser and other http-errors based middleware carry these fields. */
interface ExpressLibError {
  status?: number;
  statusCode?: number;
  type?: string;
  expose?: boolean;
  limit?: number;
}

/**
 * The one JSON error handler, mounted last. Every failure leaves as
 * `{ error: { code, message, details? } }` with a matching status; a message always says what
 * to do. Unknown errors become a generic 500; their stack goes to the log only.
 */
export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (err: unknown, req, res, next) => {
    if (res.headersSent) {
      // Streaming responses cannot be rewritten: log and cut the connection.
      logger.error('error after response started', { path: req.path, error: describe(err) });
      next(err);
      return;
    }
    const { status, body } = toResponse(err);
    if (status >= 500) logger.error('request failed', { method: req.method, path: req.path, error: describe(err) });
    res.status(status).json(body);
  };
}

function toResponse(err: unknown): { status: number; body: ApiError } {
  if (err instanceof HttpError) {
    return { status: err.status, body: { error: { code: err.code, message: err.message, details: err.details } } };
  }
  if (err instanceof ZodError) {
    const details = err.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
    const first = details[0];
    const where = first?.path ? `${first.path}: ` : '';
    return {
      status: 400,
      body: {
        error: {
          code: 'invalid_input',
          message: `The request is not valid (${where}${first?.message ?? 'unknown problem'}). Correct the listed fields and send it again.`,
          details,
        },
      },
    };
  }
  const lib = (typeof err === 'object' && err !== null ? err : {}) as ExpressLibError;
  switch (lib.type) {
    case 'entity.parse.failed':
      return bad(400, 'malformed_json', 'The request body is not valid JSON. Send a JSON object with Content-Type: application/json.');
    case 'entity.too.large':
      return bad(413, 'too_large', `The request body is larger than the ${lib.limit ?? ''} bytes allowed. Send less data per request (files go through the upload endpoint).`);
    case 'encoding.unsupported':
    case 'charset.unsupported':
      return bad(415, 'unsupported_encoding', 'The request body encoding is not supported. Send UTF-8 JSON.');
    case 'request.aborted':
      return bad(400, 'aborted', 'The request was cut off before its body arrived. Send it again.');
  }
  const status = lib.status ?? lib.statusCode;
  if (status && status >= 400 && status < 500 && lib.expose !== false) {
    const message = err instanceof Error ? err.message : 'The request was refused.';
    return bad(status, 'bad_request', `${message}. Check the request and send it again.`);
  }
  return bad(500, 'internal', 'Something went wrong on the server; nothing you sent was lost. Try again, and if it keeps happening tell your administrator the time it happened.');
}

function bad(status: number, code: string, message: string): { status: number; body: ApiError } {
  return { status, body: { error: { code, message } } };
}

function describe(err: unknown): string {
  return err instanceof Error ? (err.stack ?? err.message) : String(err);
}
