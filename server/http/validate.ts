// Request validation with the shared zod schemas: invalid input becomes 400 with per-field messages.
import type { z } from 'zod';
import { fieldErrors } from '../../shared/auth.js';
import { badRequest } from './errors.js';

/** Returns the parsed value or throws 400 `{ code: 'bad_request', fields }` naming each wrong field. */
export function parseBody<S extends z.ZodType>(schema: S, value: unknown, what = 'request'): z.output<S> {
  const result = schema.safeParse(value ?? {});
  if (result.success) return result.data;
  const fields = fieldErrors(result.error);
  const names = Object.keys(fields).filter((name) => name !== '_');
  throw badRequest(names.length ? `Please correct the ${what}: ${names.join(', ')}.` : `The ${what} is not valid.`, fields);
}
