export const PRODUCT_NAME = 'Slipless';
export const DEFAULT_DATABASE_URL = 'file:data/slipless.db';
export const MIGRATIONS_FOLDER = 'drizzle';
export const DATABASE_BUSY_TIMEOUT_MS = 5_000;
