import { createHash, randomBytes } from 'node:crypto';

export const API_TOKEN_PREFIX = 'slp_';

/** A new random API token (shown once) and the SHA-256 hex digest that is stored instead. */
export function generateSecretToken(prefix = API_TOKEN_PREFIX): { token: string; hash: string } {
  const token = `${prefix}${randomBytes(32).toString('base64url')}`;
  return { token, hash: hashSecretToken(token) };
}

/** SHA-256 hex digest of a secret token; tokens are high-entropy, so no salt or slow hash is needed. */
export function hashSecretToken(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}
