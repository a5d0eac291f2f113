import { randomBytes } from 'node:crypto';
import { hash, verify } from '@node-rs/argon2';

let dummyHash: Promise<string> | undefined;

/** Hashes a password with argon2id (RFC 9106) and a random salt. */
export function hashPassword(password: string): Promise<string> {
  return hash(password);
}

/** True when `password` matches the stored argon2 hash. */
export function verifyPassword(storedHash: string, password: string): Promise<boolean> {
  return verify(storedHash, password);
}

/**
 * An argon2id hash of a random password nobody knows, made once with the same settings as real
 * ones: checking a password against it costs what checking a real account does, so a sign-in for
 * an address without an account (or without a password) takes as long as a wrong password.
 */
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashPassword(randomBytes(32).toString('base64url'));
  return dummyHash;
}
