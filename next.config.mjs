import { securityHeaders } from './lib/security/headers.mjs';

/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  // Types are checked by `npm run typecheck` (tsc over the whole repo, tests included); `next build` (run by
  // `npm start` and the browser tests) must not refuse to serve the app over a type error in a test file.
  typescript: { ignoreBuildErrors: true },
  // CSP, frame-ancestors, nosniff, referrer policy… on every answer (lib/security/headers.mjs)
  headers: async () => [{ source: '/:path*', headers: securityHeaders({ production: process.env.NODE_ENV === 'production' }) }],
  serverExternalPackages: ['sharp', 'opencv-wasm', '@libsql/client', 'libsql', 'bcryptjs'],
};

export default nextConfig;
