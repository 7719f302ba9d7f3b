/**
 * Who is on the other end of a request, for the per-address sign-in limit and the audit trail. A client can
 * send any X-Forwarded-For it likes; only entries appended by proxies of our own can be believed. The web
 * server (lib/cli/web-server.mjs) rewrites the forwarding headers of every request with this module before
 * the app sees them, so `clientIp()` in lib/http/origin.ts reads a value it can trust.
 *
 * The rule is the usual "trust n hops" one (common practice for reverse proxies; the header format is the
 * de-facto X-Forwarded-For, a comma-separated list each proxy appends the address it received from to):
 * with n trusted proxies in front, the client is the entry n places from the right of
 * [...X-Forwarded-For, socket peer]. n = 0 (the default: Gridproof faces the network itself) means the
 * socket peer, whatever the header says. Plain JavaScript so the server entry runs without a TypeScript
 * loader; types in forwarded.d.mts.
 */

/**
 * The address as one canonical string: IPv4-mapped IPv6 (`::ffff:192.0.2.1`) as plain IPv4, brackets and a
 * port stripped (`[2001:db8::1]:443`, `192.0.2.1:80`), lower case.
 * @param {string | undefined | null} raw
 * @returns {string | null}
 */
export function canonicalAddress(raw) {
  if (!raw) return null;
  let a = raw.trim().toLowerCase();
  const bracketed = /^\[([^\]]+)\](?::\d+)?$/.exec(a);
  if (bracketed) a = bracketed[1] ?? a;
  else if (/^\d{1,3}(\.\d{1,3}){3}:\d+$/.test(a)) a = a.slice(0, a.lastIndexOf(':'));
  if (a.startsWith('::ffff:') && /^\d{1,3}(\.\d{1,3}){3}$/.test(a.slice(7))) a = a.slice(7);
  return a === '' || a === 'unknown' ? null : a;
}

/**
 * The client's address behind `trustedHops` proxies of our own.
 * @param {string | string[] | undefined} forwardedFor X-Forwarded-For as received (one or several headers)
 * @param {string | undefined} peer the socket's remote address
 * @param {number} trustedHops how many proxies of our own stand in front (0: none)
 * @returns {string | null}
 */
export function clientAddress(forwardedFor, peer, trustedHops) {
  const listed = (Array.isArray(forwardedFor) ? forwardedFor.join(',') : forwardedFor ?? '')
    .split(',').map((s) => s.trim()).filter((s) => s !== '');
  const chain = [...listed, peer ?? ''];
  // a proxy we trust wrote each of the last `trustedHops` links; the one before them is the client. When
  // the chain is shorter than promised, the leftmost entry is the best we have.
  const i = Math.max(0, chain.length - 1 - trustedHops);
  return canonicalAddress(chain[i]);
}

/**
 * The scheme the user's browser used, by the same "trust n hops" rule over [...X-Forwarded-Proto, socket
 * scheme]: with no trusted proxy, the socket's own scheme (TLS or not), whatever the header says.
 * @param {string | string[] | undefined} forwardedProto X-Forwarded-Proto as received
 * @param {'http' | 'https'} socketScheme 'https' when the socket itself is TLS
 * @param {number} trustedHops
 * @returns {'http' | 'https'}
 */
export function clientScheme(forwardedProto, socketScheme, trustedHops) {
  const listed = (Array.isArray(forwardedProto) ? forwardedProto.join(',') : forwardedProto ?? '')
    .split(',').map((s) => s.trim().toLowerCase()).filter((s) => s !== '');
  const chain = [...listed, socketScheme];
  return chain[Math.max(0, chain.length - 1 - trustedHops)] === 'https' ? 'https' : 'http';
}

/**
 * Rewrites a Node request's forwarding headers in place: X-Forwarded-For becomes the one trusted client
 * address (or is removed), X-Real-IP is removed, X-Forwarded-Proto becomes the real scheme (`clientScheme`:
 * the app reads it to decide the cookie's Secure flag and HSTS), and with no trusted proxy X-Forwarded-Host
 * is removed too (only a proxy of ours may say which host the user asked for).
 * @param {Record<string, string | string[] | undefined>} headers Node's IncomingMessage.headers
 * @param {string | undefined} peer
 * @param {number} trustedHops
 * @param {'http' | 'https'} [socketScheme] the socket's scheme (default 'http')
 */
export function normaliseForwarding(headers, peer, trustedHops, socketScheme = 'http') {
  const client = clientAddress(headers['x-forwarded-for'], peer, trustedHops);
  if (client) headers['x-forwarded-for'] = client;
  else delete headers['x-forwarded-for'];
  delete headers['x-real-ip'];
  headers['x-forwarded-proto'] = clientScheme(headers['x-forwarded-proto'], socketScheme, trustedHops);
  if (trustedHops === 0) delete headers['x-forwarded-host'];
}

/**
 * TRUST_PROXY_HOPS read and checked: a whole number from 0 to 10, default 0.
 * @param {string | undefined} raw
 * @returns {number}
 */
export function trustedHopsFrom(raw) {
  if (raw === undefined || raw.trim() === '') return 0;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 10) throw new Error(`TRUST_PROXY_HOPS must be a whole number from 0 to 10 (proxies of yours in front of Gridproof), not "${raw}".`);
  return n;
}
