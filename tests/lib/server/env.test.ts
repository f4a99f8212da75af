import { describe, expect, it } from 'vitest';
import { readServerEnv } from '../../../src/lib/server/env.ts';

describe('readServerEnv(source)', () => {
  it('makes session cookies Secure exactly when PUBLIC_ORIGIN is https', () => {
    expect(readServerEnv({ PUBLIC_ORIGIN: 'http://127.0.0.1:4321' }).secureCookies).toBe(false);
    expect(readServerEnv({ PUBLIC_ORIGIN: 'https://brinkmap.example.org' }).secureCookies).toBe(true);
    expect(readServerEnv({}).secureCookies).toBe(false);
  });

  it('reduces PUBLIC_ORIGIN to its origin (no path, no trailing slash)', () => {
    expect(readServerEnv({ PUBLIC_ORIGIN: 'https://maps.example.org/some/path/' }).publicOrigin).toBe('https://maps.example.org');
  });

  it('turns the dev mail page on by default only for a loopback SMTP server', () => {
    expect(readServerEnv({ SMTP_URL: 'smtp://127.0.0.1:2525' }).devMailPage).toBe(true);
    expect(readServerEnv({ SMTP_URL: 'smtps://u:p@mail.example.org:465' }).devMailPage).toBe(false);
    expect(readServerEnv({ SMTP_URL: 'smtps://u:p@mail.example.org:465', DEV_MAIL_PAGE: '1' }).devMailPage).toBe(true);
    expect(readServerEnv({ SMTP_URL: 'smtp://127.0.0.1:2525', DEV_MAIL_PAGE: '0' }).devMailPage).toBe(false);
  });

  it('rejects a rate limit that is not a positive integer, naming the variable', () => {
    expect(() => readServerEnv({ RATE_LIMIT_ACCOUNT_FAILURES: '0' })).toThrow(/RATE_LIMIT_ACCOUNT_FAILURES must be a positive integer, got "0"/);
    expect(() => readServerEnv({ RATE_LIMIT_WINDOW_SECONDS: 'soon' })).toThrow(/RATE_LIMIT_WINDOW_SECONDS/);
    expect(readServerEnv({ RATE_LIMIT_ADDRESS_FAILURES: '7' }).rateLimit.addressFailures).toBe(7);
  });
});
