import { afterEach, describe, expect, it, vi } from 'vitest';
import { openDatabase, migrateDatabase } from '../../../src/db';
import { authSecretWarning, ensureAuthSecret } from '../../../src/lib/server/bootstrap';
import { tempDatabaseUrl } from '../../helpers/temp';

// Keeping signing keys out of the data they protect (environment or secret manager) is common practice.

describe('where the session secret lives', () => {
  afterEach(() => {
    vi.unstubAllEnvs();
    vi.restoreAllMocks();
  });

  it('says nothing for a local install: loopback only, no mail relay, not marked production', () => {
    expect(authSecretWarning({})).toBeNull();
    expect(authSecretWarning({ HOST: 'localhost' })).toBeNull();
    expect(authSecretWarning({ HOST: '127.0.0.1', NODE_ENV: 'development' })).toBeNull();
  });

  it('warns when the secret would come from the database of an install others use', () => {
    for (const env of [{ NODE_ENV: 'production' }, { HOST: '0.0.0.0' }, { HOST: 'slipless.internal' }, { SMTP_HOST: 'smtp.example.com' }]) {
      const warning = authSecretWarning(env);
      expect(warning, JSON.stringify(env)).toMatch(/AUTH_SECRET/);
      expect(warning).toMatch(/database/);
    }
  });

  it('prints the warning at start when it generates or reads the secret from the database in production, and not when AUTH_SECRET is set', async () => {
    const database = await openDatabase(tempDatabaseUrl());
    await migrateDatabase(database);
    const warn = vi.spyOn(console, 'warn').mockImplementation(() => {});
    vi.stubEnv('NODE_ENV', 'production');
    vi.stubEnv('AUTH_SECRET', 'a-secret-from-the-environment-0123456789');
    expect(await ensureAuthSecret(database)).toBe('a-secret-from-the-environment-0123456789');
    expect(warn).not.toHaveBeenCalled();

    vi.stubEnv('AUTH_SECRET', '');
    const kept = await ensureAuthSecret(database);
    expect(kept).toMatch(/^[\w-]{43}$/);
    expect(warn).toHaveBeenCalledWith(expect.stringMatching(/AUTH_SECRET/));
    database.close();
  });
});
