// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';

export default defineConfig({
  output: 'server',
  // Served by scripts/serve.ts, which sees the socket and decides which X-Forwarded-* headers to believe.
  adapter: node({ mode: 'middleware' }),
  integrations: [react()],
  server: { host: '127.0.0.1', port: 4321 },
  devToolbar: { enabled: false },
  // Origin (CSRF) checks for every content type live in src/middleware.ts, against PUBLIC_URL (src/server/request.ts).
  security: { checkOrigin: false, allowedDomains: [{ hostname: '127.0.0.1' }, { hostname: 'localhost' }] },
  vite: {
    plugins: [tailwindcss()],
  },
});
