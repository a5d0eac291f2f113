import { describe, expect, it } from 'vitest';
import { getDatabase } from '../../../src/lib/server/database';
import { countUsers, createUsers, findUserByEmail, findUserById, normaliseEmail, replacePassword } from '../../../src/lib/server/users';
import { addTestMember } from '../../helpers/api-context';

describe('normaliseEmail', () => {
  it('trims the address and puts it in lower case', () => {
    expect(normaliseEmail('  Ada.Lovelace@Example.COM \n')).toBe('ada.lovelace@example.com');
  });
});

describe('findUserByEmail', () => {
  it('finds an account whatever the case and surrounding spaces of the address asked for', async () => {
    const database = await getDatabase();
    const member = await addTestMember('viewer');
    expect((await findUserByEmail(database, `  ${member.email.toUpperCase()} `))?.id).toBe(member.userId);
  });

  it('answers null for an address without an account, also for an empty one', async () => {
    const database = await getDatabase();
    expect(await findUserByEmail(database, 'nobody-here@slipless.example')).toBeNull();
    expect(await findUserByEmail(database, '')).toBeNull();
  });

  it('reads inside a transaction, seeing that transaction’s own writes', async () => {
    const database = await getDatabase();
    const email = `tx-${crypto.randomUUID().slice(0, 8)}@slipless.example`;
    const seen = await database.transaction(async (tx) => {
      const [created] = await createUsers(tx, [{ email, name: 'In a transaction', passwordHash: null, emailVerified: null }]);
      return { created: created.id, found: (await findUserByEmail(tx, email))?.id };
    });
    expect(seen.found).toBe(seen.created);
  });
});

describe('findUserById', () => {
  it('finds the account by id and answers null for an unknown id', async () => {
    const database = await getDatabase();
    const member = await addTestMember('editor');
    expect((await findUserById(database, member.userId))?.email).toBe(member.email);
    expect(await findUserById(database, crypto.randomUUID())).toBeNull();
  });
});

describe('createUsers and countUsers', () => {
  it('stores addresses normalised, returns the rows in the order given and counts them', async () => {
    const database = await getDatabase();
    const before = await countUsers(database);
    const suffix = crypto.randomUUID().slice(0, 8);
    const created = await database.transaction((tx) =>
      createUsers(tx, [
        { email: ` First-${suffix}@Slipless.example`, name: 'First', passwordHash: null, emailVerified: null },
        { email: `second-${suffix}@slipless.example`, name: 'Second', passwordHash: null, emailVerified: null },
      ]),
    );
    expect(created.map((u) => [u.name, u.email])).toEqual([
      ['First', `first-${suffix}@slipless.example`],
      ['Second', `second-${suffix}@slipless.example`],
    ]);
    expect(await countUsers(database)).toBe(before + 2);
  });
});

describe('replacePassword', () => {
  it('stores the hash and the time older sessions end, and marks the address verified only when asked', async () => {
    const database = await getDatabase();
    const member = await addTestMember('viewer');
    const at = new Date(Date.UTC(2030, 0, 2, 3, 4, 5));
    await database.write((db) => replacePassword(db, member.userId, { passwordHash: 'hash-one', at }));
    expect(await findUserById(database, member.userId)).toMatchObject({ passwordHash: 'hash-one', sessionsValidFrom: at, emailVerified: null });

    const later = new Date(at.getTime() + 60_000);
    await database.transaction((tx) => replacePassword(tx, member.userId, { passwordHash: 'hash-two', at: later, emailVerified: later }));
    expect(await findUserById(database, member.userId)).toMatchObject({ passwordHash: 'hash-two', sessionsValidFrom: later, emailVerified: later });
  });
});
