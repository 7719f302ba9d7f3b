/**
 * The streaming multipart reader against bodies written by an independent encoder: Node's own (undici)
 * FormData serialisation of a Request body, per RFC 7578.
 */
import { randomBytes } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { boundaryOf, MultipartError, readParts, readText } from '@/lib/checks/multipart';

async function encode(form: FormData): Promise<{ bytes: Buffer; type: string }> {
  const req = new Request('http://x/', { method: 'POST', body: form });
  return { bytes: Buffer.from(await req.arrayBuffer()), type: req.headers.get('content-type')! };
}

/** Feeds `bytes` in chunks of `size` (to cut delimiters and headers at every place). */
async function* chunked(bytes: Buffer, size: number) {
  for (let i = 0; i < bytes.length; i += size) yield bytes.subarray(i, i + size);
}

async function parseAll(bytes: Buffer, type: string, size: number) {
  const out: { name: string; filename?: string; contentType?: string; data: Buffer }[] = [];
  for await (const part of readParts(chunked(bytes, size), boundaryOf(type)!)) {
    const chunks: Buffer[] = [];
    for await (const c of part.body) chunks.push(c);
    out.push({ name: part.name, filename: part.filename, contentType: part.contentType, data: Buffer.concat(chunks) });
  }
  return out;
}

describe('streaming multipart reader', () => {
  it('reads back fields and a binary file exactly, whatever the chunk size', async () => {
    const file = randomBytes(70_000);
    // a file whose bytes contain CRLF and dashes, the material of a delimiter
    file.write('\r\n--\r\n--', 1000, 'latin1');
    const form = new FormData();
    form.append('referenceMm', '150');
    form.append('corners', '[[1,2],[3,4],[5,6],[7,8]]');
    form.append('photo', new Blob([new Uint8Array(file)], { type: 'image/jpeg' }), 'bed "one".jpg');
    form.append('title', 'after reseating — ü');
    const { bytes, type } = await encode(form);
    for (const size of [1, 7, 64, 1000, 1 << 20]) {
      const parts = await parseAll(bytes, type, size);
      expect(parts.map((p) => p.name)).toEqual(['referenceMm', 'corners', 'photo', 'title']);
      expect(parts[0]!.data.toString()).toBe('150');
      expect(parts[2]!.filename).toBe('bed "one".jpg');
      expect(parts[2]!.contentType).toBe('image/jpeg');
      expect(parts[2]!.data.equals(file)).toBe(true);
      expect(parts[3]!.data.toString('utf8')).toBe('after reseating — ü');
    }
  });

  it('skips an unread part and still reads the next', async () => {
    const form = new FormData();
    form.append('a', new Blob([new Uint8Array(5000)]), 'a.bin');
    form.append('b', 'hello');
    const { bytes, type } = await encode(form);
    const names: string[] = [];
    let b = '';
    for await (const part of readParts(chunked(bytes, 100), boundaryOf(type)!)) {
      names.push(part.name);
      if (part.name === 'b') b = await readText(part);
    }
    expect(names).toEqual(['a', 'b']);
    expect(b).toBe('hello');
  });

  it('says the form is cut off when the body ends inside a part', async () => {
    const form = new FormData();
    form.append('photo', new Blob([new Uint8Array(10_000)]), 'p.jpg');
    const { bytes, type } = await encode(form);
    const err = await parseAll(bytes.subarray(0, 6000), type, 512).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(MultipartError);
    expect((err as Error).message).toMatch(/cut off/);
  });

  it('finds the boundary in the content type, quoted or not, and nothing in other types', () => {
    expect(boundaryOf('multipart/form-data; boundary=abc123')).toBe('abc123');
    expect(boundaryOf('multipart/form-data; boundary="a b:c"')).toBe('a b:c');
    expect(boundaryOf('application/json')).toBeNull();
    expect(boundaryOf('multipart/form-data')).toBeNull();
  });
});
