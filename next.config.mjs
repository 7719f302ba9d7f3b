import { httpsOnlyHeaders, securityHeaders } from './lib/security/headers.mjs';

const production = process.env.NODE_ENV === 'production';
const httpsOnly = httpsOnlyHeaders({ production });

/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  // Types are checked by `npm run typecheck` (tsc over the whole repo, tests included); `next build` (run by
  // `npm start` and the browser tests) must not refuse to serve the app over a type error in a test file.
  typescript: { ignoreBuildErrors: true },
  // CSP, frame-ancestors, nosniff, referrer policy… on every answer (lib/security/headers.mjs)
  headers: async () => [
    { source: '/:path*', headers: securityHeaders({ production }) },
    // HSTS only on answers that went over HTTPS (the real scheme, set by lib/cli/web-server.mjs)
    ...(httpsOnly.length ? [{ source: '/:path*', has: [{ type: 'header', key: 'x-forwarded-proto', value: 'https' }], headers: httpsOnly }] : []),
    // a shared report's address answers HTML or JSON by the Accept header (rewrite below)
    { source: '/s/:token', headers: [{ key: 'Vary', value: 'Accept' }, { key: 'X-Robots-Tag', value: 'noindex' }] },
  ],
  // `/s/{token}` with `Accept: application/json` is the shared report's JSON (app/api/shared/[token])
  rewrites: async () => ({
    beforeFiles: [{ source: '/s/:token', has: [{ type: 'header', key: 'accept', value: '(.*)application/json(.*)' }], destination: '/api/shared/:token' }],
    afterFiles: [],
    fallback: [],
  }),
  serverExternalPackages: ['sharp', 'opencv-wasm', '@libsql/client', 'libsql', 'bcryptjs'],
};

export default nextConfig;
