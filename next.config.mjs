import { securityHeaders } from './lib/security/headers.mjs';

/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  // CSP, frame-ancestors, nosniff, referrer policy… on every answer (lib/security/headers.mjs)
  headers: async () => [{ source: '/:path*', headers: securityHeaders({ production: process.env.NODE_ENV === 'production' }) }],
  serverExternalPackages: ['sharp', 'opencv-wasm', '@libsql/client', 'libsql', 'bcryptjs'],
};

export default nextConfig;
