import type { NextFunction, Request, Response } from 'express';
import { ConnectionError } from 'sequelize';
import type { Logger } from './logger.ts';
import { AppError } from './errors.ts';

/** Turns anything thrown into an AppError: expected faults keep their status, the rest become a plain 500. */
export function toAppError(err: unknown): AppError {
  if (err instanceof AppError) return err;
  if (err instanceof ConnectionError) {
    return new AppError(503, 'service_unavailable', 'The database is not answering right now. Try again in a moment.', undefined, { cause: err });
  }
  const e = err as { type?: string; status?: number; message?: string; code?: string; name?: string };
  if (e?.type === 'entity.parse.failed') return new AppError(400, 'bad_request', 'The request body is not valid JSON.');
  if (e?.type === 'entity.too.large') return new AppError(413, 'too_large', 'The request body is too large.');
  // ioredis with maxRetriesPerRequest set (server/lib/redis.ts) rejects with MaxRetriesPerRequestError while Redis is away.
  // A Redis that hangs: its commands time out (REDIS_COMMAND_TIMEOUT_MS).
  if (e?.code === 'ECONNREFUSED' || e?.name === 'MaxRetriesPerRequestError' || e?.message?.includes("Stream isn't writeable") || e?.message?.includes('Connection is closed') || e?.message === 'Command timed out') {
    return new AppError(503, 'service_unavailable', 'A service Gatepost depends on is not answering right now. Try again in a moment.', undefined, { cause: err });
  }
  return new AppError(500, 'internal', 'Something went wrong on our side. It has been logged.', undefined, { cause: err, isOperational: false });
}

/** The one Express error handler: logs defects in full, answers every error in the same JSON shape. */
export function createErrorHandler(logger: Logger) {
  return (err: unknown, req: Request, res: Response, _next: NextFunction) => {
    const appError = toAppError(err);
    if (!appError.isOperational || appError.status >= 500) {
      logger.error({ err: appError.cause ?? err, method: req.method, url: req.originalUrl }, appError.message);
    }
    if (res.headersSent) return;
    if (appError.status === 503) res.set('Retry-After', '5');
    res.status(appError.status).json({
      error: { code: appError.code, message: appError.message, ...(appError.details !== undefined ? { details: appError.details } : {}) },
    });
  };
}
