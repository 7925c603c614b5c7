// One JSON error shape for every failure; the error handler never leaks stacks or SQL.
import type { ErrorRequestHandler, RequestHandler } from 'express';

export interface FieldErrors { [field: string]: string[] }

export class HttpError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly code: string = codeFor(status),
    readonly fields?: FieldErrors,
    readonly headers?: Record<string, string>,
  ) {
    super(message);
  }
}

function codeFor(status: number): string {
  return (
    { 400: 'bad_request', 401: 'unauthenticated', 403: 'forbidden', 404: 'not_found', 405: 'method_not_allowed', 409: 'conflict', 413: 'payload_too_large', 415: 'unsupported_media_type', 429: 'rate_limited' } as Record<number, string>
  )[status] ?? (status >= 500 ? 'internal_error' : 'error');
}

export const badRequest = (message: string, fields?: FieldErrors) => new HttpError(400, message, 'bad_request', fields);
export const unauthenticated = (message = 'Sign in first.') => new HttpError(401, message);
export const forbidden = (message = 'You do not have the role this needs.') => new HttpError(403, message);
export const notFound = (message = 'Not found.') => new HttpError(404, message);
export const conflict = (message: string, fields?: FieldErrors) => new HttpError(409, message, 'conflict', fields);

export const notFoundHandler: RequestHandler = (req, _res, next) => {
  // baseUrl + path: mounted at /api, req.path alone would drop the prefix from the message.
  next(new HttpError(404, `No route ${req.method} ${req.baseUrl}${req.path}.`));
};

/** The one error handler: answers `{ error: { code, message, fields? } }` with the right status. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  let status = 500;
  let body: { code: string; message: string; fields?: FieldErrors } = { code: 'internal_error', message: 'Something went wrong on our side.' };
  if (err instanceof HttpError) {
    status = err.status;
    body = { code: err.code, message: err.message, ...(err.fields ? { fields: err.fields } : {}) };
    if (err.headers) res.set(err.headers);
  } else if (err && typeof err === 'object' && 'type' in err && typeof (err as { status?: unknown }).status === 'number') {
    // body-parser errors carry `type` and `status` (entity.parse.failed, entity.too.large, ...)
    const e = err as { type: string; status: number };
    status = e.status;
    body = {
      code: e.type === 'entity.too.large' ? 'payload_too_large' : e.type === 'entity.parse.failed' ? 'malformed_json' : codeFor(status),
      message: e.type === 'entity.too.large' ? 'The request body is too large.' : e.type === 'entity.parse.failed' ? 'The request body is not valid JSON.' : 'The request could not be read.',
    };
  } else if (err && typeof err === 'object' && (err as { code?: string }).code === 'EBADCSRFTOKEN') {
    status = 403;
    body = { code: 'csrf', message: 'Missing or invalid CSRF token; reload the page and try again.' };
  }
  if (status >= 500) console.error(`[${req.method} ${req.originalUrl}]`, err);
  if (res.headersSent) return;
  res.status(status).json({ error: body });
};
