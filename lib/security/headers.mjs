/**
 * Security headers of every answer, set by next.config.mjs `headers()` (plain JavaScript so the config can
 * import it; types in headers.d.mts). Values follow the OWASP HTTP headers cheat sheet and the CSP Level 3
 * spec (W3C): no 'unsafe-eval' in production (development needs it for React's debugging tools);
 * 'unsafe-inline' scripts stay allowed because the App Router writes its payload in inline scripts and a
 * static header cannot carry a per-request nonce; frame-ancestors 'none' (and X-Frame-Options DENY for older
 * browsers) so no other site can frame a page; nosniff so an uploaded file is never run as a script;
 * Referrer-Policy same-origin so a share link's token never leaves in a Referer header.
 */

/**
 * The Content-Security-Policy value.
 * @param {{ production: boolean }} opts
 * @returns {string}
 */
export function contentSecurityPolicy({ production }) {
  const directives = [
    "default-src 'self'",
    `script-src 'self' 'unsafe-inline'${production ? '' : " 'unsafe-eval'"}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self' data:",
    `connect-src 'self'${production ? '' : ' ws: wss:'}`,
    "worker-src 'self' blob:",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ];
  return directives.join('; ');
}

/**
 * Header name/value pairs for every path.
 * @param {{ production: boolean }} opts
 * @returns {{ key: string, value: string }[]}
 */
export function securityHeaders({ production }) {
  const headers = [
    { key: 'Content-Security-Policy', value: contentSecurityPolicy({ production }) },
    { key: 'X-Content-Type-Options', value: 'nosniff' },
    { key: 'X-Frame-Options', value: 'DENY' },
    { key: 'Referrer-Policy', value: 'same-origin' },
    { key: 'Permissions-Policy', value: 'camera=(self), microphone=(), geolocation=(), payment=(), usb=()' },
    { key: 'Cross-Origin-Opener-Policy', value: 'same-origin' },
  ];
  return headers;
}

/**
 * Headers for answers that went over HTTPS only: HSTS (RFC 6797 §7.2: a host must not send it over plain
 * HTTP). next.config.mjs applies them when the request's real scheme is https, which the web server
 * (lib/cli/web-server.mjs, lib/http/forwarded.mjs) writes into X-Forwarded-Proto from the socket, or from a
 * proxy trusted by TRUST_PROXY_HOPS. COOKIE_SECURE=0 turns HSTS off as well.
 * @param {{ production: boolean }} opts
 * @returns {{ key: string, value: string }[]}
 */
export function httpsOnlyHeaders({ production }) {
  if (!production || process.env.COOKIE_SECURE === '0' || process.env.COOKIE_SECURE === 'false') return [];
  return [{ key: 'Strict-Transport-Security', value: 'max-age=31536000; includeSubDomains' }];
}
