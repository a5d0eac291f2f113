import { hash, verify } from '@node-rs/argon2';

/** Hashes a password with argon2id (RFC 9106) and a random salt. */
export function hashPassword(password: string): Promise<string> {
  return hash(password);
}

/** True when `password` matches the stored argon2 hash. */
export function verifyPassword(storedHash: string, password: string): Promise<boolean> {
  return verify(storedHash, password);
}
