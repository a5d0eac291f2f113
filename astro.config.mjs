// @ts-check
import { defineConfig, envField } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import mdx from '@astrojs/mdx';
import auth from 'auth-astro';
import tailwindcss from '@tailwindcss/vite';
import remarkMath from 'remark-math';
import rehypeKatex from 'rehype-katex';
import { rehypeHeadingIds } from '@astrojs/markdown-remark';
import rehypeAutolinkHeadings from 'rehype-autolink-headings';

export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'middleware' }),
  integrations: [react(), mdx(), auth({ configFile: './src/auth.config.ts', injectEndpoints: false })],
  markdown: {
    remarkPlugins: [remarkMath],
    // Heading ids first (Astro's own slugs, which `render()` also reports as headings) so every
    // reference heading carries a link to its own anchor that a reader can copy. The link holds no
    // text (its mark is drawn by CSS), so the headings Astro collects afterwards read as written.
    rehypePlugins: [rehypeKatex, rehypeHeadingIds, [rehypeAutolinkHeadings, { behavior: 'append', properties: { className: ['heading-anchor'], ariaLabel: 'Link to this section' }, content: [] }]],
  },
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
  // Every setting the server reads, declared once; all are read from the environment at run time
  // (server secrets), so one build serves any install. README.md's settings table explains each.
  env: {
    schema: {
      DATABASE_URL: envField.string({ context: 'server', access: 'secret', optional: true }),
      AUTH_SECRET: envField.string({ context: 'server', access: 'secret', optional: true }),
      PUBLIC_ORIGIN: envField.string({ context: 'server', access: 'secret', optional: true }),
      TRUSTED_PROXIES: envField.string({ context: 'server', access: 'secret', optional: true }),
      HOST: envField.string({ context: 'server', access: 'secret', optional: true }),
      PORT: envField.number({ context: 'server', access: 'secret', optional: true, int: true, gt: 0 }),
      MAILBOX_DIR: envField.string({ context: 'server', access: 'secret', optional: true }),
      SMTP_HOST: envField.string({ context: 'server', access: 'secret', optional: true }),
      SMTP_PORT: envField.number({ context: 'server', access: 'secret', optional: true, int: true, gt: 0 }),
      SMTP_SECURE: envField.boolean({ context: 'server', access: 'secret', default: false }),
      SMTP_USER: envField.string({ context: 'server', access: 'secret', optional: true }),
      SMTP_PASSWORD: envField.string({ context: 'server', access: 'secret', optional: true }),
      SMTP_FROM: envField.string({ context: 'server', access: 'secret', optional: true }),
      LOG_STORAGE_DIR: envField.string({ context: 'server', access: 'secret', optional: true }),
      S3_ENDPOINT: envField.string({ context: 'server', access: 'secret', optional: true }),
      S3_BUCKET: envField.string({ context: 'server', access: 'secret', optional: true }),
      S3_REGION: envField.string({ context: 'server', access: 'secret', optional: true }),
      S3_ACCESS_KEY_ID: envField.string({ context: 'server', access: 'secret', optional: true }),
      S3_SECRET_ACCESS_KEY: envField.string({ context: 'server', access: 'secret', optional: true }),
      METRICS_TOKEN: envField.string({ context: 'server', access: 'secret', optional: true }),
    },
  },
});
