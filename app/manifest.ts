/**
 * The web app manifest (served as /manifest.webmanifest by Next's metadata file convention): name, colours and
 * the icon set in public/ (written by `npm run -s icons`), so a phone can keep Gridproof on its home screen.
 */
import type { MetadataRoute } from 'next';

export default function manifest(): MetadataRoute.Manifest {
  return {
    name: 'Gridproof',
    short_name: 'Gridproof',
    description: 'Check a CNC fixture bed’s hole lattice from one photo.',
    start_url: '/',
    scope: '/',
    display: 'standalone',
    background_color: '#f5f3ec',
    theme_color: '#1f5c4a',
    icons: [
      { src: '/icon-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
      { src: '/icon-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
      { src: '/icon-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
      { src: '/icon.svg', sizes: 'any', type: 'image/svg+xml', purpose: 'any' },
    ],
  };
}
