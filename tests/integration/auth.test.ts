import { afterAll, describe, expect, it } from 'vitest';
import { Client, closeDbAfterAll, db, signedUpClient, uniqueAddress, uniqueEmail, TEST_ORIGIN } from './helpers.ts';

closeDbAfterAll(afterAll);

describe('POST /api/auth/sign-up', () => {
  it('creates the account, stores an argon2id hash and signs in with an HttpOnly SameSite=Lax cookie', async () => {
    const client = new Client();
    const email = uniqueEmail('signup');
    const res = await client.post('/api/auth/sign-up', { email, password: 'a-long-password', displayName: 'Ola Test' });
    expect(res.status).toBe(201);
    expect(res.body.user).toMatchObject({ email, displayName: 'Ola Test' });
    const cookie = res.headers.getSetCookie().find((c) => c.startsWith('bm_session='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    // The test origin is plain http on loopback, so the cookie must not be Secure (or browsers drop it).
    expect(TEST_ORIGIN.startsWith('http:')).toBe(true);
    expect(cookie).not.toMatch(/;\s*Secure/i);
    const row = await db('users').where({ email }).first('password_hash');
    expect(row.password_hash.startsWith('$argon2id$')).toBe(true);
    const me = await client.get('/api/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.user.email).toBe(email);
  });

  it('normalises the e-mail address and refuses a second account for it with 409', async () => {
    const email = uniqueEmail('dup');
    await signedUpClient({ email });
    const again = await new Client().post('/api/auth/sign-up', { email: `  ${email.toUpperCase()} `, password: 'another-password', displayName: 'Twin' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('conflict');
    const [{ n }] = await db('users').where({ email }).count({ n: '*' });
    expect(Number(n)).toBe(1);
  });
});

describe('POST /api/auth/sign-in', () => {
  it('signs in with the right password', async () => {
    const owner = await signedUpClient();
    const c = new Client();
    const res = await c.post('/api/auth/sign-in', { email: owner.user!.email, password: owner.password });
    expect(res.status).toBe(200);
    expect((await c.get('/api/auth/me')).status).toBe(200);
  });

  it('answers 401 with the same message for a wrong password and for an unknown account', async () => {
    const owner = await signedUpClient();
    const wrong = await new Client().post('/api/auth/sign-in', { email: owner.user!.email, password: 'not-the-password' });
    const unknown = await new Client().post('/api/auth/sign-in', { email: uniqueEmail('ghost'), password: 'whatever-1' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body.error).toEqual({ code: 'unauthenticated', message: 'Wrong e-mail address or password.' });
    expect(unknown.body.error).toEqual(wrong.body.error);
    expect(wrong.headers.getSetCookie().some((c) => c.startsWith('bm_session=') && !c.startsWith('bm_session=;'))).toBe(false);
  });

  it('locks an account after RATE_LIMIT_ACCOUNT_FAILURES failures, even from other addresses and with the right password', async () => {
    const limit = Number(process.env.RATE_LIMIT_ACCOUNT_FAILURES ?? 5);
    const victim = await signedUpClient();
    for (let i = 0; i < limit; i++) {
      const r = await new Client(uniqueAddress()).post('/api/auth/sign-in', { email: victim.user!.email, password: `guess-${i}` });
      expect(r.status).toBe(401);
    }
    const blocked = await new Client(uniqueAddress()).post('/api/auth/sign-in', { email: victim.user!.email, password: victim.password });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('rate_limited');
    expect(blocked.body.error.message).toMatch(/Too many failed sign-ins for this account\. Try again in \d+ minutes?\./);
    expect(Number(blocked.headers.get('retry-after'))).toBeGreaterThan(0);
    // The counter lives in MariaDB (shared by every app process).
    const row = await db('rate_limits').where('key', `signin_account:${victim.user!.email}`).first();
    expect(row.points).toBeGreaterThanOrEqual(limit);
  });

  it('limits failures per client address across accounts (RATE_LIMIT_ADDRESS_FAILURES)', async () => {
    const limit = Number(process.env.RATE_LIMIT_ADDRESS_FAILURES ?? 30);
    const address = uniqueAddress();
    for (let i = 0; i < limit; i++) {
      const r = await new Client(address).post('/api/auth/sign-in', { email: uniqueEmail('spray'), password: 'spray-password' });
      expect(r.status).toBe(401);
    }
    const real = await signedUpClient();
    const blocked = await new Client(address).post('/api/auth/sign-in', { email: real.user!.email, password: real.password });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.message).toMatch(/from your network address/);
    // Another address is not affected.
    expect((await new Client(uniqueAddress()).post('/api/auth/sign-in', { email: real.user!.email, password: real.password })).status).toBe(200);
  });

  it('a successful sign-in clears the account counter', async () => {
    const person = await signedUpClient();
    for (let i = 0; i < 3; i++) await new Client().post('/api/auth/sign-in', { email: person.user!.email, password: 'typo-typo' });
    expect((await new Client().post('/api/auth/sign-in', { email: person.user!.email, password: person.password })).status).toBe(200);
    expect(await db('rate_limits').where('key', `signin_account:${person.user!.email}`).first()).toBeUndefined();
  });
});

describe('POST /api/auth/sign-out and session expiry', () => {
  it('sign-out ends the session: the row is gone and the cookie no longer works', async () => {
    const c = await signedUpClient();
    const sessionId = c.cookies.get('bm_session')!;
    const stolen = new Client();
    stolen.cookies.set('bm_session', sessionId);
    expect((await c.post('/api/auth/sign-out')).status).toBe(204);
    expect(await db('sessions').where({ id: sessionId }).first()).toBeUndefined();
    expect((await stolen.get('/api/auth/me')).status).toBe(401);
  });

  it('an expired session (expires_at in the past) answers 401 and clears the cookie', async () => {
    const c = await signedUpClient();
    const sessionId = c.cookies.get('bm_session')!;
    await db('sessions').where({ id: sessionId }).update({ expires_at: new Date(Date.now() - 60_000) });
    const res = await c.get('/api/auth/me');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthenticated');
    expect(res.headers.getSetCookie().some((x) => /^bm_session=;|^bm_session=.*Max-Age=0/i.test(x))).toBe(true);
    // A private page sends the expired visitor to the sign-in page.
    const page = await c.get('/members');
    expect(page.status).toBe(303);
    expect(page.headers.get('location')).toBe('/sign-in?next=%2Fmembers');
  });
});

describe('POST /api/auth/password', () => {
  it('changes the password, ends the other sessions, keeps this one signed in', async () => {
    const c = await signedUpClient();
    const other = new Client();
    await other.post('/api/auth/sign-in', { email: c.user!.email, password: c.password });
    const res = await c.post('/api/auth/password', { currentPassword: c.password, newPassword: 'brand-new-password' });
    expect(res.status).toBe(204);
    expect((await c.get('/api/auth/me')).status).toBe(200);
    expect((await other.get('/api/auth/me')).status).toBe(401);
    expect((await new Client().post('/api/auth/sign-in', { email: c.user!.email, password: c.password })).status).toBe(401);
    expect((await new Client().post('/api/auth/sign-in', { email: c.user!.email, password: 'brand-new-password' })).status).toBe(200);
  });

  it('refuses a wrong current password with 400 naming currentPassword and keeps the old hash', async () => {
    const c = await signedUpClient();
    const before = await db('users').where({ id: c.user!.id }).first('password_hash');
    const res = await c.post('/api/auth/password', { currentPassword: 'nope-nope-nope', newPassword: 'brand-new-password' });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('currentPassword');
    expect((await db('users').where({ id: c.user!.id }).first('password_hash')).password_hash).toBe(before.password_hash);
  });
});

describe('form pages', () => {
  it('the sign-in form signs in and redirects to next', async () => {
    const person = await signedUpClient();
    const c = new Client();
    const res = await c.request('POST', '/sign-in', { form: { email: person.user!.email, password: person.password!, next: '/members' } });
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe('/members');
    expect((await c.get('/api/auth/me')).status).toBe(200);
  });

  it('the sign-in form shows the error with status 401 on a wrong password', async () => {
    const person = await signedUpClient();
    const res = await new Client().request('POST', '/sign-in', { form: { email: person.user!.email, password: 'wrong-password' } });
    expect(res.status).toBe(401);
    expect(res.text).toContain('Wrong e-mail address or password.');
  });

  it('a form post from a foreign origin is refused by the origin check', async () => {
    const person = await signedUpClient();
    const res = await new Client().request('POST', '/sign-in', {
      form: { email: person.user!.email, password: person.password! },
      headers: { origin: 'https://elsewhere.example' },
    });
    expect(res.status).toBe(403);
  });

  it('the sign-out form ends the session and goes to /sign-in', async () => {
    const c = await signedUpClient();
    const res = await c.request('POST', '/sign-out', { form: {} });
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe('/sign-in');
    expect((await c.get('/api/auth/me')).status).toBe(401);
  });

  it('private pages redirect signed-out visitors to /sign-in with next', async () => {
    for (const path of ['/', '/members', '/account/password', '/dev/mail', '/runs']) {
      const res = await new Client().get(path);
      expect(res.status, path).toBe(303);
      expect(res.headers.get('location'), path).toBe(path === '/' ? '/sign-in' : `/sign-in?next=${encodeURIComponent(path)}`);
    }
  });
});
