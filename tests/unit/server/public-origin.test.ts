import { afterEach, describe, expect, it } from 'vitest';
import { configuredPublicOrigin, publicOrigin, publicUrl } from '../../../src/lib/server/public-origin';

describe('PUBLIC_ORIGIN', () => {
  afterEach(() => {
    delete process.env.PUBLIC_ORIGIN;
  });

  it('is read at run time and takes the place of the origin the server saw', () => {
    expect(publicOrigin('http://localhost/api/x')).toBe('http://localhost');
    process.env.PUBLIC_ORIGIN = 'https://slipless.example.org/';
    expect(publicOrigin('http://localhost/api/x')).toBe('https://slipless.example.org');
    expect(publicUrl('http://localhost:4321/api/auth/csrf?x=1').href).toBe('https://slipless.example.org/api/auth/csrf?x=1');
  });

  it('names the setting when it is not a bare http(s) origin', () => {
    for (const bad of ['slipless.example.org', 'ftp://slipless.example.org', 'https://slipless.example.org/app', 'https://u:p@slipless.example.org']) {
      expect(() => configuredPublicOrigin({ PUBLIC_ORIGIN: bad })).toThrow(/PUBLIC_ORIGIN/);
    }
    expect(configuredPublicOrigin({ PUBLIC_ORIGIN: 'http://10.0.0.5:8080' })).toBe('http://10.0.0.5:8080');
    expect(configuredPublicOrigin({})).toBeNull();
  });
});
