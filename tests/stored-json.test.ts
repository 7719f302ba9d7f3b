import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { parseStoredJson } from '@/lib/stored-json';

describe('reading a stored JSON column', () => {
  const Schema = z.object({ mm: z.number().positive() });

  it('gives the value when the column holds JSON that matches the schema, with the schema applied', () => {
    expect(parseStoredJson('{"mm": 1.5, "extra": 1}', Schema)).toEqual({ mm: 1.5 });
  });

  it('gives null for an empty column, text that is not JSON, and JSON that does not match', () => {
    expect(parseStoredJson(null, Schema)).toBeNull();
    expect(parseStoredJson(undefined, Schema)).toBeNull();
    expect(parseStoredJson('', Schema)).toBeNull();
    expect(parseStoredJson('{"mm": 1.5', Schema)).toBeNull();
    expect(parseStoredJson('{"mm": -1}', Schema)).toBeNull();
  });
});
