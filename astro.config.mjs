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
    // Hosts the app may be reached on (any port); a deployment adds its own through APP_HOSTNAMES at build time.
    allowedDomains: ['localhost', '127.0.0.1', ...(process.env.APP_HOSTNAMES ?? '').split(',').filter(Boolean)].map((hostname) => ({ hostname })),
  },
  image: { service: { entrypoint: 'astro/assets/services/noop' } },
  vite: { plugins: [tailwindcss()], build: { assetsInlineLimit: 0 } },
  env: {
    schema: {
      DATABASE_URL: envField.string({ context: 'server', access: 'secret', optional: true }),
    },
  },
});
