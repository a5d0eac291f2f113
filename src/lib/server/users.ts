import { count, eq } from 'drizzle-orm';
import type { Database, DrizzleDb, Transaction } from '../../db';
import { users } from '../../db/schema';

export type User = typeof users.$inferSelect;
export type NewUser = Pick<typeof users.$inferInsert, 'name' | 'passwordHash' | 'emailVerified'> & { email: string };

/** The database for a plain read, or the transaction a read must belong to so that its answer holds until the commit. */
export type UserSource = Database | Transaction;

/** A handle given by `database.write` or `database.transaction`: the only way user rows are written. */
export type UserWriter = DrizzleDb | Transaction;

function reader(source: UserSource): DrizzleDb | Transaction {
  return 'write' in source ? source.db : source;
}

/** Addresses are stored trimmed and in lower case, so every lookup compares them that way. */
export function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}

/** The user with this address (compared after `normaliseEmail`), or null. */
export async function findUserByEmail(source: UserSource, email: string): Promise<User | null> {
  const [user] = await reader(source).select().from(users).where(eq(users.email, normaliseEmail(email)));
  return user ?? null;
}

/** The user with this id, or null. */
export async function findUserById(source: UserSource, userId: string): Promise<User | null> {
  const [user] = await reader(source).select().from(users).where(eq(users.id, userId));
  return user ?? null;
}

/** How many accounts exist. */
export async function countUsers(source: UserSource): Promise<number> {
  const [{ n }] = await reader(source).select({ n: count() }).from(users);
  return n;
}

/** Creates accounts with normalised addresses, in the order given. */
export async function createUsers(writer: UserWriter, people: readonly NewUser[]): Promise<User[]> {
  return writer
    .insert(users)
    .values(people.map((person) => ({ ...person, email: normaliseEmail(person.email) })))
    .returning();
}

/**
 * Stores a new password hash and ends every session begun before `at`; `emailVerified` is set
 * when the change came through a link mailed to the address, which proves the address works.
 */
export async function replacePassword(
  writer: UserWriter,
  userId: string,
  change: { passwordHash: string; at: Date; emailVerified?: Date },
): Promise<void> {
  await writer
    .update(users)
    .set({ passwordHash: change.passwordHash, sessionsValidFrom: change.at, ...(change.emailVerified ? { emailVerified: change.emailVerified } : {}) })
    .where(eq(users.id, userId));
}
