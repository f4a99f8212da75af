// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';

const publicHost = process.env.PUBLIC_ORIGIN ? new URL(process.env.PUBLIC_ORIGIN).hostname : undefined;

export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react()],
  server: { host: '127.0.0.1', port: 4321 },
  security: {
    checkOrigin: true,
    allowedDomains: [
      { hostname: '127.0.0.1' },
      { hostname: 'localhost' },
      ...(publicHost ? [{ hostname: publicHost }] : []),
    ],
  },
  vite: {
    plugins: [tailwindcss()],
    // pdfkit is imported on demand by the figure export; pre-bundling it up front keeps the dev server
    // from re-optimizing (and invalidating the page) on the first PDF export.
    optimizeDeps: { include: ['pdfkit', 'pdfkit/output'] },
  },
});
