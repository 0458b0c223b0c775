import type { MetadataRoute } from 'next';

/** The web app manifest, served by Next at /manifest.webmanifest (colours: ink-900 and paper of tailwind.config.ts). */
export default function manifest(): MetadataRoute.Manifest {
  return {
    name: 'Steerwise',
    short_name: 'Steerwise',
    description: 'Design receiving arrays, estimate bearings with honest uncertainty, and hand the work on.',
    start_url: '/',
    display: 'standalone',
    background_color: '#f7f9fa',
    theme_color: '#111c28',
    icons: [
      { src: '/icon.svg', sizes: 'any', type: 'image/svg+xml' },
      { src: '/icon-192.png', sizes: '192x192', type: 'image/png' },
      { src: '/icon-512.png', sizes: '512x512', type: 'image/png' },
    ],
  };
}
