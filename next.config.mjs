/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  serverExternalPackages: ['sharp', 'opencv-wasm', '@libsql/client', 'libsql', 'bcryptjs'],
};

export default nextConfig;
