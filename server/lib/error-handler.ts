import type { ErrorRequestHandler } from 'express';
import { ZodError } from 'zod';
import type { Logger } from 'pino';
import { HttpError } from './errors.js';

type BodyParserError = Error & { type?: string; status?: number; code?: string; statusCode?: number };

/** Turns any error into the API's single error shape. Unknown errors are logged and answered without detail. */
export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (err, req, res, _next) => {
    const send = (status: number, code: string, message: string, details?: unknown) => {
      if (res.headersSent) return;
      res.status(status).json({ error: { code, message, ...(details === undefined ? {} : { details }) } });
    };
    if (err instanceof HttpError) return send(err.status, err.code, err.message, err.details);
    if (err instanceof ZodError) {
      const issues = err.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
      const first = issues[0];
      return send(400, 'VALIDATION_FAILED', first ? `${first.path ? `${first.path}: ` : ''}${first.message}` : 'Invalid input.', issues);
    }
    const e = err as BodyParserError;
    if (e.code === 'CSRF_INVALID') return send(403, 'CSRF_INVALID', e.message);
    if (e.type === 'entity.parse.failed') return send(400, 'MALFORMED_JSON', 'The request body is not valid JSON.');
    if (e.type === 'entity.too.large') return send(413, 'TOO_LARGE', 'The request body is too large.');
    if (typeof e.status === 'number' && e.status >= 400 && e.status < 500) {
      return send(e.status, 'BAD_REQUEST', e.message || 'Bad request.');
    }
    logger.error({ err, method: req.method, url: req.originalUrl }, 'unhandled error');
    send(500, 'INTERNAL', 'Something went wrong on our side. Nothing was changed; please try again.');
  };
}
