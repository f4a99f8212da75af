/** Sign-up, sign-in, sign-out and password change; the API routes and the form pages both call these. */
import type { Cookie } from 'lucia';
import { db } from '../db.ts';
import { newId } from '../ids.ts';
import { conflict, HttpError, unauthorized } from '../http.ts';
import { audit } from '../audit.ts';
import { lucia } from './lucia.ts';
import { decoyHash, hashPassword, verifyPassword } from './password.ts';
import { assertSignInAllowed, consumeSignUp, recordSignInFailure, recordSignInSuccess } from './rate-limit.ts';

export interface PublicUser {
  id: string;
  email: string;
  displayName: string;
}

export interface SignedIn {
  user: PublicUser;
  cookie: Cookie;
}

export async function signUp(input: { email: string; password: string; displayName: string }, address: string): Promise<SignedIn> {
  await consumeSignUp(address);
  const existing = await db('users').where({ email: input.email }).first('id');
  if (existing) throw conflict('An account with this e-mail address already exists; sign in instead.');
  const id = newId();
  const passwordHash = await hashPassword(input.password);
  try {
    await db.transaction(async (trx) => {
      await trx('users').insert({ id, email: input.email, display_name: input.displayName, password_hash: passwordHash });
      await audit({ workspaceId: null, actorId: id, action: 'user.signed_up', targetType: 'user', targetId: id }, trx);
    });
  } catch (err) {
    if ((err as { code?: string }).code === 'ER_DUP_ENTRY') throw conflict('An account with this e-mail address already exists; sign in instead.');
    throw err;
  }
  const session = await lucia.createSession(id, {});
  return { user: { id, email: input.email, displayName: input.displayName }, cookie: lucia.createSessionCookie(session.id) };
}

export async function signIn(input: { email: string; password: string }, address: string): Promise<SignedIn> {
  await assertSignInAllowed(input.email, address);
  const row = await db('users').where({ email: input.email }).first('id', 'email', 'display_name', 'password_hash');
  const ok = row ? await verifyPassword(row.password_hash, input.password) : (await verifyPassword(await decoyHash(), input.password), false);
  if (!row || !ok) {
    await recordSignInFailure(input.email, address);
    throw unauthorized('Wrong e-mail address or password.');
  }
  await recordSignInSuccess(input.email);
  const session = await lucia.createSession(row.id, {});
  return { user: { id: row.id, email: row.email, displayName: row.display_name }, cookie: lucia.createSessionCookie(session.id) };
}

export async function signOut(sessionId: string | undefined): Promise<Cookie> {
  if (sessionId) await lucia.invalidateSession(sessionId);
  return lucia.createBlankSessionCookie();
}

/** Checks the current password, stores the new hash, ends every session of the user and opens a fresh one. */
export async function changePassword(userId: string, input: { currentPassword: string; newPassword: string }): Promise<Cookie> {
  const row = await db('users').where({ id: userId }).first('password_hash');
  if (!row) throw unauthorized();
  if (!(await verifyPassword(row.password_hash, input.currentPassword))) {
    throw new HttpError(400, 'invalid_input', 'currentPassword: is not your current password', { field: 'currentPassword' });
  }
  const passwordHash = await hashPassword(input.newPassword);
  await db.transaction(async (trx) => {
    await trx('users').where({ id: userId }).update({ password_hash: passwordHash, password_changed_at: new Date(), updated_at: new Date() });
    await audit({ workspaceId: null, actorId: userId, action: 'user.password_changed', targetType: 'user', targetId: userId }, trx);
  });
  await lucia.invalidateUserSessions(userId);
  const session = await lucia.createSession(userId, {});
  return lucia.createSessionCookie(session.id);
}
