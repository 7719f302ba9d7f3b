/**
 * The one error type and the one JSON error shape of Gridproof.
 *
 * Use: throw `new AppError('not_found', 404, 'No such bed')` (or a helper below) anywhere in a service or
 * handler; the route wrapper (lib/http/route.ts) and the action wrapper (lib/http/action.ts) turn it into
 * `{ "error": { "code", "message", "fields"? } }` with its HTTP status. Anything else thrown becomes a 500
 * `internal` error whose message reveals nothing (the cause is logged on the server). `fields` maps a
 * dotted input path (`pattern.families.0.pitch.x`) to a message, for forms. Never put a password or a
 * token in a message.
 */
import { z } from 'zod';

export type ErrorFields = Record<string, string>;

/** The error body every API answer uses. */
export type ErrorBody = { error: { code: string; message: string; fields?: ErrorFields } };

export class AppError extends Error {
  constructor(
    /** Stable machine-readable code, snake_case (`not_found`, `forbidden`, `invalid_input`, …). */
    public readonly code: string,
    /** HTTP status. */
    public readonly status: number,
    message: string,
    public readonly fields?: ErrorFields,
    /** Extra response headers (a 429's Retry-After). */
    public readonly headers?: Record<string, string>,
  ) {
    super(message);
    this.name = 'AppError';
  }

  toBody(): ErrorBody {
    return { error: { code: this.code, message: this.message, ...(this.fields ? { fields: this.fields } : {}) } };
  }
}

export const unauthenticated = (message = 'Sign in first.') => new AppError('unauthenticated', 401, message);
export const forbidden = (message = 'Your role in this workshop does not allow that.') => new AppError('forbidden', 403, message);
/** Also the answer for another workshop's record: we never confirm that it exists. */
export const notFound = (what = 'record') => new AppError('not_found', 404, `No such ${what}.`);
export const conflict = (message: string, fields?: ErrorFields) => new AppError('conflict', 409, message, fields);
export const invalidInput = (message: string, fields?: ErrorFields) => new AppError('invalid_input', 422, message, fields);

/** Flattens a zod error into `fields` (first message per path) and a one-line summary. */
export function fromZodError(err: z.ZodError, message = 'Some fields need attention.'): AppError {
  const fields: ErrorFields = {};
  for (const issue of clearIssues(err.issues)) {
    const key = issue.path.length ? issue.path.map(String).join('.') : '_';
    fields[key] ??= issue.message;
  }
  return invalidInput(message, fields);
}

type Issue = { path: PropertyKey[]; message: string; code?: string; expected?: unknown; errors?: Issue[][] };

/**
 * Issues with each failed union ("Invalid input") replaced by the issues of the option the value came closest
 * to (the deepest issue, then the fewest), so the message names the field that was sent. A value of the wrong
 * type for every option says what the field must be ("pattern must be a JSON object").
 */
export function clearIssues(issues: readonly Issue[]): Issue[] {
  return issues.flatMap((issue) => {
    if (issue.code !== 'invalid_union' || !issue.errors?.length) return [issue];
    const options = issue.errors.map((o) => clearIssues(o));
    const atRoot = options.every((o) => o.every((i) => i.path.length === 0 && i.code === 'invalid_type'));
    if (atRoot) {
      const kinds = [...new Set(options.flatMap((o) => o.map((i) => String(i.expected))))].map((k) => (k === 'object' ? 'a JSON object' : k === 'array' ? 'a JSON array' : `a ${k}`));
      const name = issue.path.length ? String(issue.path[issue.path.length - 1]) : 'the value';
      return [{ ...issue, errors: undefined, message: `${name} must be ${kinds.join(' or ')}` }];
    }
    const depth = (o: Issue[]) => Math.max(...o.map((i) => i.path.length));
    const best = options.reduce((a, b) => (depth(b) > depth(a) || (depth(b) === depth(a) && b.length < a.length) ? b : a));
    return best.map((i) => ({ ...i, path: [...issue.path, ...i.path] }));
  });
}

/** Maps anything thrown to an AppError; unknown errors are logged and hidden behind a 500. */
export function toAppError(err: unknown): AppError {
  if (err instanceof AppError) return err;
  if (err instanceof z.ZodError) return fromZodError(err);
  // known failures of the database and of storage get a clear 503 instead of the anonymous 500 (checked by
  // name: this module imports neither layer)
  const name = (err as Error | null)?.name;
  if (name === 'DatabaseBusyError') {
    return new AppError('busy', 503, 'Gridproof is busy writing something else and could not save this in time. Nothing was saved; try again in a moment.');
  }
  if (name === 'StorageError' && (err as { code?: string }).code === 'write-failed') {
    console.error('[gridproof] storage write failed', err);
    return new AppError('storage_failed', 503, 'The photo could not be stored (the storage refused the write). Nothing was saved; try again later or tell whoever runs this Gridproof.');
  }
  console.error('[gridproof] unexpected error', err);
  return new AppError('internal', 500, 'Something went wrong on the server. Try again; if it persists, tell whoever runs this Gridproof.');
}

/** A JSON Response carrying an AppError. */
export function errorResponse(err: AppError, headers?: Record<string, string>): Response {
  return Response.json(err.toBody(), { status: err.status, headers: { ...headers, ...err.headers } });
}
