/**
 * Reading a JSON column (pattern, detections, photo quality, distances…) back through its zod schema, for places
 * where a missing or unreadable value is not an error but an absence: the value, or null when the column is empty,
 * is not JSON, or does not match the schema.
 */
import type { z } from 'zod';

export function parseStoredJson<S extends z.ZodType>(text: string | null | undefined, schema: S): z.output<S> | null {
  if (!text) return null;
  let json: unknown;
  try { json = JSON.parse(text); } catch { return null; }
  const r = schema.safeParse(json);
  return r.success ? r.data : null;
}
