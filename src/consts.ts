export const PRODUCT_NAME = 'Slipless';
export const DEFAULT_DATABASE_URL = 'file:data/slipless.db';
export const MIGRATIONS_FOLDER = 'drizzle';
export const DATABASE_BUSY_TIMEOUT_MS = 5_000;
/** Request header through which the auth endpoint passes the client's address to Auth.js. */
export const CLIENT_ADDRESS_HEADER = 'x-slipless-client-address';
export const TEAM_COOKIE = 'slipless_team';
/** Folder where the local mailbox saves each mail as an .eml file when no relay is set (MAILBOX_DIR overrides it). */
export const DEFAULT_MAILBOX_DIR = 'data/mail';
/** Folder where controller logs are stored when no S3 endpoint is set (LOG_STORAGE_DIR overrides it). */
export const DEFAULT_LOG_STORAGE_DIR = 'data/uploads';
