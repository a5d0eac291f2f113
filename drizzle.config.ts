import { defineConfig } from 'drizzle-kit';

const url = process.env.DATABASE_URL ?? 'file:data/slipless.db';
const isServer = /^(https?|wss?|libsql):/.test(url);

export default defineConfig({
  schema: './src/db/schema.ts',
  out: './drizzle',
  dialect: isServer ? 'turso' : 'sqlite',
  dbCredentials: { url },
});
