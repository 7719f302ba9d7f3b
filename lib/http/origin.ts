/**
 * Same-origin check for changing requests (POST, PUT, PATCH, DELETE). A browser sends `Origin` and
 * `Sec-Fetch-Site` with such requests; a page on another site is refused (403 `cross_site`). A request with
 * neither header (curl, scripts using the public API) passes: it cannot carry a victim's cookie by accident.
 * Allowed hosts: the request's Host (or X-Forwarded-Host behind a proxy) and the host of APP_URL.
 */
import { AppError } from './errors';

export const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

export function allowedHosts(headers: Headers, requestUrl?: string): Set<string> {
  const hosts = new Set<string>();
  const fwd = headers.get('x-forwarded-host')?.split(',')[0]?.trim();
  if (fwd) hosts.add(fwd.toLowerCase());
  const host = headers.get('host');
  if (host) hosts.add(host.toLowerCase());
  if (!host && requestUrl) {
    try {
      hosts.add(new URL(requestUrl).host.toLowerCase());
    } catch {
      /* not a URL: ignore */
    }
  }
  if (process.env.APP_URL) {
    try {
      hosts.add(new URL(process.env.APP_URL).host.toLowerCase());
    } catch {
      /* validated at start */
    }
  }
  return hosts;
}

/** Throws AppError 403 `cross_site` when a changing request comes from another site. */
export function assertSameOrigin(method: string, headers: Headers, requestUrl?: string): void {
  if (SAFE_METHODS.has(method.toUpperCase())) return;
  const refuse = () => new AppError('cross_site', 403, 'This request came from another site and was refused.');
  const site = headers.get('sec-fetch-site');
  if (site === 'cross-site' || site === 'same-site') throw refuse();
  const origin = headers.get('origin');
  if (origin === null) return;
  let host: string;
  try {
    host = new URL(origin).host.toLowerCase();
  } catch {
    throw refuse(); // "null" or garbage
  }
  if (!allowedHosts(headers, requestUrl).has(host)) throw refuse();
}

/** The client's address as the proxy or socket reports it (for the audit trail and rate limits). */
export function clientIp(headers: Headers): string | null {
  return headers.get('x-forwarded-for')?.split(',')[0]?.trim() || headers.get('x-real-ip') || null;
}

/**
 * True when the request came over HTTPS: X-Forwarded-Proto, which the web server (lib/cli/web-server.mjs)
 * sets to the real scheme (the socket's, or a proxy's trusted by TRUST_PROXY_HOPS), else the URL's scheme.
 */
export function requestIsHttps(headers: Headers, requestUrl?: string): boolean {
  const proto = headers.get('x-forwarded-proto')?.split(',')[0]?.trim().toLowerCase();
  if (proto) return proto === 'https';
  try {
    return requestUrl ? new URL(requestUrl).protocol === 'https:' : false;
  } catch {
    return false;
  }
}

/** The public base URL of this Gridproof (for links): APP_URL, else the request's own origin. */
export function publicBaseUrl(req: Request): string {
  if (process.env.APP_URL) return process.env.APP_URL.replace(/\/$/, '');
  const host = req.headers.get('x-forwarded-host')?.split(',')[0]?.trim() || req.headers.get('host');
  const proto = req.headers.get('x-forwarded-proto')?.split(',')[0]?.trim() || new URL(req.url).protocol.replace(':', '');
  return host ? `${proto}://${host}` : new URL(req.url).origin;
}
