// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';

export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react()],
  server: { host: '127.0.0.1', port: 4321 },
  // Form posts from another origin are refused (Astro's CSRF guard); kept explicit on purpose.
  security: { checkOrigin: true },
  image: { service: { entrypoint: 'astro/assets/services/noop' } },
  telemetry: false,
  vite: {
    plugins: [tailwindcss()],
    worker: { format: 'es' },
  },
});
