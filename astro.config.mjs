// @ts-check
import { defineConfig, envField } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import mdx from '@astrojs/mdx';
import auth from 'auth-astro';
import tailwindcss from '@tailwindcss/vite';
import remarkMath from 'remark-math';
import rehypeKatex from 'rehype-katex';

export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react(), mdx(), auth({ configFile: './src/auth.config.ts', injectEndpoints: false })],
  markdown: { remarkPlugins: [remarkMath], rehypePlugins: [rehypeKatex] },
  security: {
    // src/middleware.ts is the one origin check: Astro's own also refused scripts that carry a
    // bearer token (bodiless DELETEs, multipart uploads) and ran before any header was added.
    checkOrigin: false,
    // Host names Astro builds request URLs from (any port); any other Host header becomes
    // localhost, so it can never reach a mailed link. Deployments name their public origin at run
    // time with PUBLIC_ORIGIN (src/lib/server/public-origin.ts) instead.
    allowedDomains: [{ hostname: 'localhost' }, { hostname: '127.0.0.1' }],
  },
  image: { service: { entrypoint: 'astro/assets/services/noop' } },
  vite: { plugins: [tailwindcss()], build: { assetsInlineLimit: 0 } },
  env: {
    schema: {
      DATABASE_URL: envField.string({ context: 'server', access: 'secret', optional: true }),
    },
  },
});
