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
  security: { checkOrigin: true },
  vite: {
    plugins: [tailwindcss()],
    resolve: { alias: { '@': new URL('./src', import.meta.url).pathname } },
  },
});
