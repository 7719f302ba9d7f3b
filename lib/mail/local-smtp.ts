/**
 * Development mail server: an SMTP server on 127.0.0.1 (smtp-server) that accepts every message, parses it
 * (mailparser) and stores it in a folder (`data/mail` by default) as `<id>.eml` (the raw message) and
 * `<id>.json` (the parsed summary), so an owner can read the outbox on a dev-only page through
 * `listLocalMail()` / `getLocalMail()`. Never run it in production: it accepts any sender and any login.
 */
import { randomBytes } from 'node:crypto';
import { mkdir, readFile, readdir, writeFile } from 'node:fs/promises';
import type { AddressInfo } from 'node:net';
import { join, resolve } from 'node:path';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { z } from 'zod';
import { DEFAULT_LOCAL_MAIL_DIR, DEFAULT_LOCAL_SMTP_PORT } from './config';

/** One attachment of a received message; `contentBase64` only from `getLocalMail`. */
export interface LocalMailAttachment {
  filename: string | null;
  contentType: string;
  /** Content-ID without angle brackets, for inline images referenced as `cid:` in the HTML. */
  cid: string | null;
  disposition: string | null;
  sizeBytes: number;
}

/** A message the local server received. */
export interface LocalMail {
  id: string;
  /** Milliseconds since the Unix epoch (UTC) when the server received it. */
  receivedAt: number;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string | null;
  attachments: LocalMailAttachment[];
  messageId: string | null;
}

export interface LocalMailFull extends LocalMail {
  attachments: (LocalMailAttachment & { contentBase64: string })[];
  /** The HTML part with every `cid:` reference replaced by a `data:` URL (show it in a sandboxed iframe). */
  htmlWithInlineImages: string | null;
  raw: string;
}

const LocalMailSchema = z.object({
  id: z.string(),
  receivedAt: z.number(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  html: z.string().nullable(),
  attachments: z.array(
    z.object({ filename: z.string().nullable(), contentType: z.string(), cid: z.string().nullable(), disposition: z.string().nullable(), sizeBytes: z.number() }),
  ),
  messageId: z.string().nullable(),
});

const ID_PATTERN = /^\d{13}-[0-9a-f]{12}$/;

function mailDir(dir?: string): string {
  return resolve(dir ?? process.env.LOCAL_MAIL_DIR ?? DEFAULT_LOCAL_MAIL_DIR);
}

function addressesOf(a: AddressObject | AddressObject[] | undefined): string[] {
  if (!a) return [];
  const list = Array.isArray(a) ? a : [a];
  return list.flatMap((o) => o.value.map((v) => (v.name ? `${v.name} <${v.address ?? ''}>` : (v.address ?? ''))));
}

export interface LocalSmtpOptions {
  /** TCP port on 127.0.0.1; 0 picks a free one (see the returned `port`). Default `LOCAL_SMTP_PORT` or 2525. */
  port?: number;
  /** Folder for received mail; default `LOCAL_MAIL_DIR` or `data/mail`. */
  dir?: string;
  /** Called after each message is stored. */
  onMessage?: (mail: LocalMail) => void | Promise<void>;
  /** Largest message accepted, bytes (default 20 MB). */
  maxBytes?: number;
}

export interface LocalSmtpServer {
  host: '127.0.0.1';
  port: number;
  dir: string;
  close(): Promise<void>;
}

/** Starts the development SMTP server; resolves once it listens. */
export async function startLocalSmtp(options: LocalSmtpOptions = {}): Promise<LocalSmtpServer> {
  const dir = mailDir(options.dir);
  await mkdir(dir, { recursive: true });
  const maxBytes = options.maxBytes ?? 20 * 1024 * 1024;
  const server = new SMTPServer({
    name: 'gridproof-dev-mail',
    banner: 'Gridproof development mail server',
    disabledCommands: ['STARTTLS'],
    authOptional: true,
    size: maxBytes,
    logger: false,
    onAuth(_auth, _session, callback) {
      callback(null, { user: 'dev' });
    },
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('error', (err: Error) => callback(err));
      stream.on('end', () => {
        if ((stream as unknown as { sizeExceeded?: boolean }).sizeExceeded) {
          callback(Object.assign(new Error('message too large'), { responseCode: 552 }));
          return;
        }
        const raw = Buffer.concat(chunks);
        const envelopeTo = session.envelope.rcptTo.map((r) => r.address);
        storeMessage(dir, raw, envelopeTo)
          .then(async (mail) => {
            await options.onMessage?.(mail);
            callback();
          })
          .catch((err: unknown) => callback(err instanceof Error ? err : new Error(String(err))));
      });
    },
  });
  const port = options.port ?? (Number(process.env.LOCAL_SMTP_PORT) || DEFAULT_LOCAL_SMTP_PORT);
  await new Promise<void>((ok, fail) => {
    const onError = (err: Error) => fail(err);
    server.once('error', onError);
    server.listen(port, '127.0.0.1', () => {
      server.off('error', onError);
      ok();
    });
  });
  server.on('error', () => {
    // A broken client connection must not bring the app down; smtp-server already answers it.
  });
  const address = server.server.address() as AddressInfo;
  return {
    host: '127.0.0.1',
    port: address.port,
    dir,
    close: () => new Promise<void>((ok) => server.close(() => ok())),
  };
}

async function storeMessage(dir: string, raw: Buffer, envelopeTo: string[]): Promise<LocalMail> {
  const receivedAt = Date.now();
  const id = `${receivedAt}-${randomBytes(6).toString('hex')}`;
  const parsed = await simpleParser(raw, { keepCidLinks: true });
  const to = addressesOf(parsed.to);
  const mail: LocalMail = {
    id,
    receivedAt,
    from: addressesOf(parsed.from).join(', '),
    to: to.length ? to : envelopeTo,
    subject: parsed.subject ?? '',
    text: parsed.text ?? '',
    html: typeof parsed.html === 'string' ? parsed.html : null,
    attachments: parsed.attachments.map((a) => ({
      filename: a.filename ?? null,
      contentType: a.contentType,
      cid: a.cid ?? null,
      disposition: a.contentDisposition ?? null,
      sizeBytes: a.size,
    })),
    messageId: parsed.messageId ?? null,
  };
  await writeFile(join(dir, `${id}.eml`), raw);
  await writeFile(join(dir, `${id}.json`), JSON.stringify(mail));
  return mail;
}

/** The messages the local server stored, newest first (at most `limit`, default 100). */
export async function listLocalMail(options: { dir?: string; limit?: number } = {}): Promise<LocalMail[]> {
  const dir = mailDir(options.dir);
  let names: string[];
  try {
    // the folder is chosen at run time (LOCAL_MAIL_DIR): nothing for the build to trace
    names = await readdir(/*turbopackIgnore: true*/ dir);
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return [];
    throw err;
  }
  const ids = names
    .filter((n) => n.endsWith('.json'))
    .map((n) => n.slice(0, -'.json'.length))
    .filter((id) => ID_PATTERN.test(id))
    .sort()
    .reverse()
    .slice(0, options.limit ?? 100);
  const out: LocalMail[] = [];
  for (const id of ids) {
    const parsed = LocalMailSchema.safeParse(JSON.parse(await readFile(join(dir, `${id}.json`), 'utf8')));
    if (parsed.success) out.push(parsed.data);
  }
  return out;
}

/** One stored message with its attachments' content, or null when there is no such id. */
export async function getLocalMail(id: string, options: { dir?: string } = {}): Promise<LocalMailFull | null> {
  if (!ID_PATTERN.test(id)) return null;
  const dir = mailDir(options.dir);
  let raw: Buffer;
  try {
    raw = await readFile(join(dir, `${id}.eml`));
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return null;
    throw err;
  }
  const summary = LocalMailSchema.parse(JSON.parse(await readFile(join(dir, `${id}.json`), 'utf8')));
  const parsed = await simpleParser(raw);
  const attachments = parsed.attachments.map((a) => ({
    filename: a.filename ?? null,
    contentType: a.contentType,
    cid: a.cid ?? null,
    disposition: a.contentDisposition ?? null,
    sizeBytes: a.size,
    contentBase64: a.content.toString('base64'),
  }));
  // mailparser replaces each cid: link by a data: URL of its attachment unless told to keep them.
  const htmlWithInlineImages = typeof parsed.html === 'string' ? parsed.html : null;
  return { ...summary, attachments, htmlWithInlineImages, raw: raw.toString('utf8') };
}

const RUNNING = Symbol.for('gridproof.localSmtp');
type GlobalWithSmtp = typeof globalThis & { [RUNNING]?: Promise<LocalSmtpServer | null> };

/**
 * Starts the development mail server once per process when mail is in local mode (no SMTP_HOST, not
 * production); resolves null when it is not wanted or another process (the web app or the worker) already
 * listens on the port. Safe to call from every start-up path and across dev hot reloads.
 */
export function ensureLocalSmtp(options: Omit<LocalSmtpOptions, 'port'> & { env?: Record<string, string | undefined> } = {}): Promise<LocalSmtpServer | null> {
  const g = globalThis as GlobalWithSmtp;
  g[RUNNING] ??= (async () => {
    const env = options.env ?? process.env;
    if (env.SMTP_HOST || env.NODE_ENV === 'production') return null;
    const port = Number(env.LOCAL_SMTP_PORT) || DEFAULT_LOCAL_SMTP_PORT;
    try {
      return await startLocalSmtp({ ...options, port, dir: options.dir ?? env.LOCAL_MAIL_DIR });
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'EADDRINUSE') return null;
      throw err;
    }
  })();
  return g[RUNNING];
}
