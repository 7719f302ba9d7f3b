/**
 * A streaming reader of multipart/form-data bodies (RFC 7578; boundary syntax RFC 2046 §5.1.1), so an upload
 * goes to storage as it arrives instead of being held in memory. Parts come in order; a part's body must be
 * read to its end (or abandoned by stopping the iteration) before the next part is asked for.
 */

export class MultipartError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'MultipartError';
  }
}

export interface Part {
  /** The form field name (Content-Disposition `name`). */
  name: string;
  /** The file name for a file part, else undefined. */
  filename?: string;
  contentType?: string;
  /** The part's bytes, streamed. */
  body: AsyncGenerator<Buffer>;
}

const CRLF = Buffer.from('\r\n');
const HEADER_END = Buffer.from('\r\n\r\n');
const MAX_HEADER_BYTES = 8 * 1024;

/** The boundary of a `multipart/form-data; boundary=…` content type, or null. */
export function boundaryOf(contentType: string | null): string | null {
  if (!contentType || !/^multipart\/form-data\s*;/i.test(contentType)) return null;
  const m = /;\s*boundary=(?:"([^"]{1,70})"|([^\s;]{1,70}))/i.exec(contentType);
  return m ? (m[1] ?? m[2] ?? null) : null;
}

function parseHeaders(raw: string): { name: string; filename?: string; contentType?: string } {
  let name: string | undefined;
  let filename: string | undefined;
  let contentType: string | undefined;
  for (const line of raw.split('\r\n')) {
    const i = line.indexOf(':');
    if (i < 0) continue;
    const key = line.slice(0, i).trim().toLowerCase();
    const value = line.slice(i + 1).trim();
    if (key === 'content-disposition') {
      const n = /(?:^|;)\s*name="((?:[^"\\]|\\.)*)"/i.exec(value) ?? /(?:^|;)\s*name=([^;\s]+)/i.exec(value);
      const f = /(?:^|;)\s*filename="((?:[^"\\]|\\.)*)"/i.exec(value) ?? /(?:^|;)\s*filename=([^;\s]+)/i.exec(value);
      if (n) name = n[1]!.replace(/\\(.)/g, '$1');
      // browsers (WHATWG HTML, multipart/form-data encoding) write ", CR and LF in names as %22, %0D, %0A
      if (f) filename = f[1]!.replace(/\\(.)/g, '$1').replace(/%22/g, '"').replace(/%0D/g, '\r').replace(/%0A/g, '\n');
    } else if (key === 'content-type') {
      contentType = value;
    }
  }
  if (name === undefined) throw new MultipartError('A part of the form has no name.');
  return { name, ...(filename !== undefined ? { filename } : {}), ...(contentType ? { contentType } : {}) };
}

/** Reads the parts of `body` (split by `boundary`) one after the other. */
export async function* readParts(body: AsyncIterable<Uint8Array>, boundary: string): AsyncGenerator<Part> {
  const iterator = body[Symbol.asyncIterator]();
  let buf = Buffer.alloc(0);
  let ended = false;
  const more = async (): Promise<boolean> => {
    if (ended) return false;
    const r = await iterator.next();
    if (r.done) { ended = true; return false; }
    buf = buf.length ? Buffer.concat([buf, Buffer.from(r.value)]) : Buffer.from(r.value);
    return true;
  };
  const dashBoundary = Buffer.from(`--${boundary}`);
  const delimiter = Buffer.from(`\r\n--${boundary}`);

  // preamble, then the first boundary line
  for (;;) {
    const i = buf.indexOf(dashBoundary);
    if (i >= 0 && (i === 0 || buf.subarray(i - 2, i).equals(CRLF))) { buf = buf.subarray(i + dashBoundary.length); break; }
    if (buf.length > MAX_HEADER_BYTES) throw new MultipartError('The form does not start with its boundary.');
    if (!(await more())) throw new MultipartError('The form is empty or cut off.');
  }

  for (;;) {
    // after a boundary: "--" ends the form, CRLF starts a part
    while (buf.length < 2) if (!(await more())) throw new MultipartError('The form is cut off.');
    if (buf[0] === 0x2d && buf[1] === 0x2d) return;
    if (!buf.subarray(0, 2).equals(CRLF)) throw new MultipartError('Malformed boundary line in the form.');
    buf = buf.subarray(2);
    let end: number;
    while ((end = buf.indexOf(HEADER_END)) < 0) {
      if (buf.length > MAX_HEADER_BYTES) throw new MultipartError('A part of the form has too long a header.');
      if (!(await more())) throw new MultipartError('The form is cut off in a part header.');
    }
    const headers = parseHeaders(buf.subarray(0, end).toString('utf8'));
    buf = buf.subarray(end + HEADER_END.length);

    let done = false;
    async function* partBody(): AsyncGenerator<Buffer> {
      for (;;) {
        const i = buf.indexOf(delimiter);
        if (i >= 0) {
          if (i > 0) yield buf.subarray(0, i);
          buf = buf.subarray(i + delimiter.length);
          done = true;
          return;
        }
        // keep what could be the start of a delimiter split across chunks
        const keep = delimiter.length - 1;
        if (buf.length > keep) {
          const out = buf.subarray(0, buf.length - keep);
          buf = buf.subarray(buf.length - keep);
          yield out;
        }
        if (!(await more())) throw new MultipartError('The form is cut off in the middle of a part.');
      }
    }
    const bodyIt = partBody();
    yield { ...headers, body: bodyIt };
    // skip whatever the consumer left unread
    if (!done) for await (const _ of bodyIt) { /* drain */ }
    if (!done) throw new MultipartError('The form is cut off in the middle of a part.');
  }
}

/** Reads a small text part fully (for form fields), refusing more than `maxBytes`. */
export async function readText(part: Part, maxBytes = 64 * 1024): Promise<string> {
  const chunks: Buffer[] = [];
  let n = 0;
  for await (const c of part.body) {
    n += c.length;
    if (n > maxBytes) throw new MultipartError(`The form field "${part.name}" is too long.`);
    chunks.push(c);
  }
  return Buffer.concat(chunks).toString('utf8');
}
