/**
 * The one error type the API raises on purpose. `isOperational` errors are expected (bad input, no access) and
 * answered with their status; anything else is a defect, logged in full and answered with a plain 500.
 */
export class AppError extends Error {
  constructor(
    public readonly status: number,
    public readonly code: string,
    message: string,
    public readonly details?: unknown,
    options?: { cause?: unknown; isOperational?: boolean },
  ) {
    super(message, { cause: options?.cause });
    this.name = 'AppError';
    this.isOperational = options?.isOperational ?? true;
  }
  readonly isOperational: boolean;
}

export const badRequest = (message: string, details?: unknown) => new AppError(400, 'bad_request', message, details);
export const unauthorized = (message = 'Sign in to continue.') => new AppError(401, 'unauthorized', message);
export const forbidden = (message = 'Your role in this lab does not allow this.') => new AppError(403, 'forbidden', message);
/** Also used for records of other labs, so a user cannot learn that they exist. */
export const notFound = (what = 'Not found') => new AppError(404, 'not_found', what);
export const conflict = (message: string) => new AppError(409, 'conflict', message);
export const tooManyRequests = (message: string, retryAfterSeconds: number) =>
  new AppError(429, 'too_many_requests', message, { retryAfterSeconds });
export const serviceUnavailable = (message: string, cause?: unknown) =>
  new AppError(503, 'service_unavailable', message, undefined, { cause });
