import type { ErrorRequestHandler, RequestHandler } from 'express';
import { log } from './log';

export interface ErrorExtra {
  field?: string;
  row?: number;
  column?: number | string;
  [key: string]: unknown;
}

/** An error meant for the client: its status, code, message and extra fields are sent as they are. */
export class AppError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly extra: ErrorExtra = {},
  ) {
    super(message);
    this.name = 'AppError';
  }
}

export function badRequest(message: string, field?: string): AppError {
  return new AppError(400, 'invalid_input', message, field === undefined ? {} : { field });
}
export function unauthorized(message = 'Sign in to continue.'): AppError {
  return new AppError(401, 'unauthorized', message);
}
export function forbidden(message = 'Your role does not allow this.'): AppError {
  return new AppError(403, 'forbidden', message);
}
export function notFound(what = 'Resource'): AppError {
  return new AppError(404, 'not_found', `${what} not found.`);
}
export function conflict(message: string, extra?: ErrorExtra): AppError {
  return new AppError(409, 'conflict', message, extra);
}

export interface ErrorBody {
  error: { code: string; message: string; field?: string; [key: string]: unknown };
}

/** JSON 404 for any /api path no router claimed. */
export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json({ error: { code: 'not_found', message: `No API route ${req.method} ${req.path}.` } } satisfies ErrorBody);
};

interface BodyParserError extends Error {
  type?: string;
  status?: number;
  limit?: number;
}

/**
 * The one error handler. Known errors go out as {error:{code,message,...}}; anything else is
 * logged with the request id and answered with a generic 500, never with a stack.
 */
export const errorHandler: ErrorRequestHandler = (err: unknown, req, res, _next) => {
  let status = 500;
  let body: ErrorBody;
  if (err instanceof AppError) {
    status = err.status;
    body = { error: { ...err.extra, code: err.code, message: err.message } };
  } else if (err && typeof err === 'object' && typeof (err as BodyParserError).type === 'string') {
    const e = err as BodyParserError;
    switch (e.type) {
      case 'entity.parse.failed':
        status = 400;
        body = { error: { code: 'invalid_json', message: 'The request body is not valid JSON.' } };
        break;
      case 'entity.too.large':
        status = 413;
        body = { error: { code: 'body_too_large', message: `The request body is larger than the limit of ${e.limit ?? 'the server'} bytes.` } };
        break;
      case 'encoding.unsupported':
      case 'charset.unsupported':
        status = 415;
        body = { error: { code: 'unsupported_encoding', message: 'The request body encoding is not supported.' } };
        break;
      default:
        status = e.status && e.status >= 400 && e.status < 500 ? e.status : 400;
        body = { error: { code: 'bad_request', message: 'The request body could not be read.' } };
    }
  } else {
    log('error', 'unhandled error', { requestId: req.id, method: req.method, path: req.originalUrl, error: err instanceof Error ? err.stack ?? err.message : String(err) });
    body = { error: { code: 'internal', message: `Something went wrong on the server (request ${req.id}).` } };
  }
  if (res.headersSent) {
    res.end();
    return;
  }
  res.status(status).json(body);
};
