import type { Request } from 'express';
import type { z } from 'zod';
import { AppError } from './errors';

function toAppError(error: z.ZodError, where: 'body' | 'query' | 'params'): AppError {
  const issue = error.issues[0];
  const field = issue && issue.path.length > 0 ? issue.path.map(String).join('.') : undefined;
  const message = field ? `${field}: ${issue!.message}` : `Invalid request ${where}: ${issue?.message ?? 'invalid'}`;
  return new AppError(400, 'invalid_input', message, field === undefined ? {} : { field });
}

/** The parsed, typed body, or a 400 naming the first bad field. A missing body counts as {}. */
export function parseBody<S extends z.ZodType>(schema: S, req: Request): z.output<S> {
  const r = schema.safeParse(req.body ?? {});
  if (!r.success) throw toAppError(r.error, 'body');
  return r.data;
}

export function parseQuery<S extends z.ZodType>(schema: S, req: Request): z.output<S> {
  const r = schema.safeParse(req.query ?? {});
  if (!r.success) throw toAppError(r.error, 'query');
  return r.data;
}

export function parseParams<S extends z.ZodType>(schema: S, req: Request): z.output<S> {
  const r = schema.safeParse(req.params ?? {});
  if (!r.success) throw toAppError(r.error, 'params');
  return r.data;
}

/** A positive integer route parameter, or 400 naming it. */
export function intParam(req: Request, name: string): number {
  const raw = req.params[name];
  const n = Number(raw);
  if (typeof raw !== 'string' || !/^\d{1,15}$/.test(raw) || !Number.isSafeInteger(n) || n <= 0) {
    throw new AppError(400, 'invalid_input', `${name}: must be a positive integer`, { field: name });
  }
  return n;
}
