// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';

export default defineConfig({
  output: 'server',
  outDir: process.env.TIDEMARK_OUT_DIR ?? './dist',
  adapter: node({ mode: 'standalone' }),
  integrations: [react()],
  server: { host: '127.0.0.1', port: 4321 },
  // Form posts from another origin are refused (Astro's CSRF guard); kept explicit on purpose.
  // allowedDomains: the hosts whose Host header Astro trusts when it builds request URLs (and so the origin check).
  // Loopback always; a deployment adds its public host names, comma-separated, in TIDEMARK_HOSTS at build time.
  security: {
    checkOrigin: true,
    allowedDomains: ['127.0.0.1', 'localhost', ...(process.env.TIDEMARK_HOSTS ?? '').split(',').filter(Boolean)].map((hostname) => ({ hostname })),
  },
  image: { service: { entrypoint: 'astro/assets/services/noop' } },
  vite: {
    plugins: [tailwindcss()],
    worker: { format: 'es' },
  },
});
