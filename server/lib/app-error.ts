export type AppErrorCode =
  | 'bad_request'
  | 'validation_failed'
  | 'unauthenticated'
  | 'forbidden'
  | 'not_found'
  | 'conflict'
  | 'too_many_requests'
  | 'server_busy'
  | 'account_locked'
  | 'csrf_invalid'
  | 'db_unavailable'
  | 'payload_too_large'
  | 'internal';

/** An error a service throws on purpose; the error handler turns it into `{ error: { code, message } }`. */
export class AppError extends Error {
  constructor(
    readonly code: AppErrorCode,
    message: string,
    readonly status: number,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'AppError';
  }

  static notFound(what: string): AppError {
    return new AppError('not_found', `${what} was not found.`, 404);
  }

  static forbidden(message = 'Your role does not allow this.'): AppError {
    return new AppError('forbidden', message, 403);
  }

  static unauthenticated(message = 'Please sign in.'): AppError {
    return new AppError('unauthenticated', message, 401);
  }
}
