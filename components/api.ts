/**
 * The browser's way to the API: same-origin fetch with JSON in and out. A non-2xx answer throws ApiError
 * carrying the server's `{ error: { code, message, fields? } }`.
 */
export class ApiError extends Error {
  constructor(
    public readonly status: number,
    public readonly code: string,
    message: string,
    public readonly fields: Record<string, string> = {},
  ) {
    super(message);
  }
}

export async function api<T>(path: string, opts: { method?: string; body?: unknown } = {}): Promise<T> {
  const res = await fetch(path, {
    method: opts.method ?? (opts.body === undefined ? 'GET' : 'POST'),
    headers: opts.body === undefined ? { accept: 'application/json' } : { 'content-type': 'application/json', accept: 'application/json' },
    body: opts.body === undefined ? undefined : JSON.stringify(opts.body),
    credentials: 'same-origin',
  });
  const text = await res.text();
  let data: unknown = null;
  try {
    data = text ? JSON.parse(text) : null;
  } catch {
    data = null;
  }
  if (!res.ok) {
    const e = (data as { error?: { code?: string; message?: string; fields?: Record<string, string> } } | null)?.error;
    throw new ApiError(res.status, e?.code ?? 'http_' + res.status, e?.message ?? `The server answered ${res.status}.`, e?.fields ?? {});
  }
  return data as T;
}

/** The message of an error for a person. */
export const errorText = (err: unknown): string => (err instanceof Error ? err.message : 'Something went wrong.');
/** A field's message from an ApiError, if any. */
export const fieldError = (err: unknown, name: string): string | undefined => (err instanceof ApiError ? err.fields[name] : undefined);
