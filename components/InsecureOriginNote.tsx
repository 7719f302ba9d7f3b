'use client';
/**
 * Warns on the sign-in page when the session cookie is marked Secure but the page came over plain HTTP from
 * a host other than localhost: the browser would drop the cookie and sign-in would seem to do nothing.
 */
import { useSyncExternalStore } from 'react';

const LOCAL = new Set(['localhost', '127.0.0.1', '[::1]']);
const subscribe = () => () => {};
const insecure = () => window.location.protocol === 'http:' && !LOCAL.has(window.location.hostname);

export function InsecureOriginNote({ cookieSecure }: { cookieSecure: boolean }) {
  const show = useSyncExternalStore(subscribe, insecure, () => false);
  if (!cookieSecure || !show) return null;
  return (
    <p role="note" className="panel border-l-8 border-l-fail">
      This page came over plain HTTP, so your browser will not keep the sign-in cookie. Serve Gridproof over HTTPS,
      or on a trusted shop network start it with <code className="font-mono">COOKIE_SECURE=0</code>.
    </p>
  );
}
