/**
 * The production web server: Next.js's request handler behind Node's own HTTP server, so every request's
 * forwarding headers are rewritten from the socket before the app reads them (lib/http/forwarded.mjs): a
 * client cannot pick its own address for the per-address sign-in limit by sending X-Forwarded-For.
 * Otherwise it serves exactly what `next start` serves (the same build in .next, the same handler).
 *
 * Env: PORT (default 3000), HOST (default all interfaces), TRUST_PROXY_HOPS (default 0: no proxy of yours in
 * front; 1 behind one reverse proxy that appends to X-Forwarded-For, and so on).
 * Run: `npm run web` (after `next build`); `npm start` runs it beside the worker.
 * Plain JavaScript so it starts without a TypeScript loader in the request path.
 */
import { createServer } from 'node:http';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import next from 'next';
import { normaliseForwarding, trustedHopsFrom } from '../http/forwarded.mjs';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');

let hops;
try {
  hops = trustedHopsFrom(process.env.TRUST_PROXY_HOPS);
} catch (err) {
  console.error(`[gridproof] ${err instanceof Error ? err.message : String(err)}`);
  process.exit(2);
}
const port = Number(process.env.PORT || 3000);
const hostname = process.env.HOST || undefined;
if (!Number.isInteger(port) || port < 1 || port > 65535) {
  console.error(`[gridproof] PORT must be a whole number from 1 to 65535, not "${process.env.PORT}".`);
  process.exit(2);
}

const app = next({ dev: false, dir: ROOT, hostname: hostname ?? 'localhost', port });
const handle = app.getRequestHandler();
await app.prepare();

const server = createServer((req, res) => {
  // `encrypted` is set on a TLS socket (node:tls); this server is plain HTTP unless one wraps it in TLS
  normaliseForwarding(req.headers, req.socket.remoteAddress, hops, 'encrypted' in req.socket && req.socket.encrypted ? 'https' : 'http');
  handle(req, res).catch((err) => {
    console.error('[gridproof] request failed:', err);
    if (!res.headersSent) res.statusCode = 500;
    res.end();
  });
});
server.keepAliveTimeout = 65_000; // longer than the usual proxy idle timeout (60 s), so a proxy never reuses a closed socket
server.listen(port, hostname, () => {
  console.log(`[gridproof] web listening on ${hostname ?? '0.0.0.0'}:${port}${hops ? ` (trusting ${hops} proxy hop${hops > 1 ? 's' : ''})` : ''}`);
});

let stopping = false;
for (const sig of ['SIGINT', 'SIGTERM']) {
  process.on(sig, () => {
    if (stopping) return;
    stopping = true;
    // finish the requests in flight, then leave; give up after 10 s
    setTimeout(() => process.exit(0), 10_000).unref();
    server.close(() => process.exit(0));
    server.closeIdleConnections();
  });
}
