import type { ErrorRequestHandler, RequestHandler } from 'express';
import {
  BaseError,
  ConnectionError,
  UniqueConstraintError,
  ValidationError as OrmValidationError,
} from 'sequelize';
import { ZodError } from 'zod';
import { fieldLabel } from '../../shared/vocabulary';
import { AppError } from '../lib/app-error';
import { logger } from '../lib/logger';

type Body = { error: { code: string; message: string; details?: unknown } };

function isConnectionFailure(err: unknown): boolean {
  if (err instanceof ConnectionError) return true;
  const code = (err as { code?: string } | null)?.code;
  return [
    'ECONNREFUSED',
    'ER_GET_CONNECTION_TIMEOUT',
    'ER_CONNECTION_ALREADY_CLOSED',
    'ER_SOCKET_UNEXPECTED_CLOSE',
  ].includes(code ?? '');
}

export function toErrorResponse(err: unknown): { status: number; body: Body } {
  if (err instanceof AppError) {
    return {
      status: err.status,
      body: { error: { code: err.code, message: err.message, details: err.details } },
    };
  }
  if (err instanceof ZodError) {
    // details keep the path for programs; the message a person reads names the field in their words.
    const details = err.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
    const first = err.issues[0];
    const label = first ? fieldLabel(first.path) : null;
    const message = first
      ? label
        ? `${label}: ${first.message}`
        : first.message
      : 'The request is not valid.';
    return { status: 400, body: { error: { code: 'validation_failed', message, details } } };
  }
  if (err instanceof UniqueConstraintError) {
    return { status: 409, body: { error: { code: 'conflict', message: 'That already exists.' } } };
  }
  if (err instanceof OrmValidationError) {
    return {
      status: 400,
      body: { error: { code: 'validation_failed', message: err.errors[0]?.message ?? err.message } },
    };
  }
  if (isConnectionFailure(err) || (err instanceof BaseError && isConnectionFailure(err.cause))) {
    return {
      status: 503,
      body: {
        error: {
          code: 'db_unavailable',
          message: 'The database is not answering; please try again shortly.',
        },
      },
    };
  }
  const status = (err as { status?: number; statusCode?: number } | null)?.status;
  if (status === 403 && (err as { code?: string }).code === 'EBADCSRFTOKEN') {
    return {
      status: 403,
      body: {
        error: { code: 'csrf_invalid', message: 'Your page is out of date; reload it and try again.' },
      },
    };
  }
  if (status === 413) {
    return {
      status: 413,
      body: { error: { code: 'payload_too_large', message: 'The request is too large.' } },
    };
  }
  if (status === 400 && err instanceof SyntaxError) {
    return {
      status: 400,
      body: { error: { code: 'bad_request', message: 'The request body is not valid JSON.' } },
    };
  }
  return { status: 500, body: { error: { code: 'internal', message: 'Something went wrong on our side.' } } };
}

export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  const { status, body } = toErrorResponse(err);
  if (status >= 500) logger.error({ err, url: req.originalUrl, method: req.method }, 'request failed');
  if (res.headersSent) return;
  const retryAfter = (err instanceof AppError ? err.details : undefined) as
    { retryAfterSeconds?: number } | undefined;
  if (typeof retryAfter?.retryAfterSeconds === 'number')
    res.set('Retry-After', String(retryAfter.retryAfterSeconds));
  res.status(status).json(body);
};

export const notFoundApi: RequestHandler = (req, res) => {
  res
    .status(404)
    .json({ error: { code: 'not_found', message: `No API endpoint ${req.method} ${req.path}.` } });
};
