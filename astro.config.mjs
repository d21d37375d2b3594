// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';

// Two flavours of one app. `TIDEMARK_BUILD=demo` (what `npm start` and `npm test` build) adds the dev mailbox, the
// demo-file route and the browser test hooks. Any other build, `npm run build` and `npm run serve` included, is the
// production flavour: those routes are not generated and the hooks are compiled out (dead code behind a constant).
const demo = process.env.TIDEMARK_BUILD === 'demo';

/** @type {import('astro').AstroIntegration} */
const demoRoutes = {
  name: 'tidemark-demo-routes',
  hooks: {
    'astro:config:setup': ({ injectRoute }) => {
      if (!demo) return;
      injectRoute({ pattern: '/dev/mailbox', entrypoint: './src/demo-routes/mailbox.astro' });
      injectRoute({ pattern: '/demo/[file]', entrypoint: './src/demo-routes/demo-file.ts' });
    },
  },
};

export default defineConfig({
  output: 'server',
  outDir: process.env.TIDEMARK_OUT_DIR ?? './dist',
  // Middleware mode: server/main.mjs serves the static files itself, from a list made at start (no disk lookup per request).
  adapter: node({ mode: 'middleware' }),
  integrations: [react(), demoRoutes],
  server: { host: '127.0.0.1', port: 4321 },
  // Cross-site posts are refused by our own middleware (src/lib/server/same-origin.ts): Astro's origin check would
  // also refuse our own forms, which browsers post with `Origin: null` under `Referrer-Policy: no-referrer`.
  // allowedDomains: the hosts whose Host header Astro trusts when it builds request URLs (and so the origin check).
  // Loopback always; a deployment adds its public host names, comma-separated, in TIDEMARK_HOSTS at build time.
  security: {
    checkOrigin: false,
    allowedDomains: ['127.0.0.1', 'localhost', ...(process.env.TIDEMARK_HOSTS ?? '').split(',').filter(Boolean)].map((hostname) => ({ hostname })),
  },
  image: { service: { entrypoint: 'astro/assets/services/noop' } },
  vite: {
    plugins: [tailwindcss()],
    // `npm run dev` serves scripts and workers through Vite, not server/main.mjs: they need the same isolation headers,
    // or a worker would not be cross-origin isolated and could not take the page's shared samples.
    server: { headers: { 'cross-origin-opener-policy': 'same-origin', 'cross-origin-embedder-policy': 'require-corp' } },
    worker: { format: 'es' },
    define: {
      'import.meta.env.TIDEMARK_DEMO': JSON.stringify(demo),
      'import.meta.env.TIDEMARK_PRODUCTION': JSON.stringify(!demo),
    },
  },
});
