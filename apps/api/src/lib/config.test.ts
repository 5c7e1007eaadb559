import { describe, expect, it } from 'vitest';
import { isLocalUrl, readEnv, startMode } from './config';

describe('startMode: demo data only where asked or unpublished', () => {
  it.each([
    [{}, 'demo'], // npm start: PUBLIC_URL unset
    [{ PUBLIC_URL: 'http://localhost:3000' }, 'demo'],
    [{ PUBLIC_URL: 'http://127.0.0.1:3000' }, 'demo'],
    [{ PUBLIC_URL: 'http://coilpath.localhost' }, 'demo'],
    [{ PUBLIC_URL: 'https://coilpath.acme-hvac.com' }, 'production'],
    [{ PUBLIC_URL: 'http://10.0.0.5:3000' }, 'production'],
    [{ PUBLIC_URL: 'https://localhost.acme-hvac.com' }, 'production'],
    [{ COILPATH_SEED: 'demo', PUBLIC_URL: 'https://coilpath.acme-hvac.com' }, 'demo'],
    [{ COILPATH_SEED: 'never' }, 'production'],
    [{ COILPATH_SEED: 'never', PUBLIC_URL: 'http://localhost:3000' }, 'production'],
  ])('%j → %s', (env, mode) => {
    expect(startMode(readEnv(env))).toBe(mode);
  });

  it('refuses an unknown COILPATH_SEED', () => {
    expect(() => readEnv({ COILPATH_SEED: 'sometimes' })).toThrow(/COILPATH_SEED/);
  });

  it('reads a malformed PUBLIC_URL as not local', () => {
    expect(isLocalUrl('not a url')).toBe(false);
    expect(isLocalUrl('http://[::1]:3000')).toBe(true);
  });
});
