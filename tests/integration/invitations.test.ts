import { afterAll, describe, expect, it } from 'vitest';
import { Client, closeDbAfterAll, db, signedUpClient, uniqueEmail, waitForMail, workspaceWithRoles, TEST_ORIGIN } from './helpers.ts';
import { tokenHash } from '../../src/lib/server/workspaces/invitations.ts';

closeDbAfterAll(afterAll);

function tokenFrom(link: string): string {
  return new URL(link).pathname.split('/').pop()!;
}

describe('invitations', () => {
  it('the mail reaches the fake SMTP server and its link joins a new account with the invited role', async () => {
    const ws = await workspaceWithRoles('Invitation workspace');
    const email = uniqueEmail('invitee');
    const res = await ws.owner.post(`/api/workspaces/${ws.workspaceId}/invitations`, { email, role: 'modeler' });
    expect(res.status).toBe(201);
    expect(res.body.invitation).toMatchObject({ email, role: 'modeler', status: 'pending' });

    const mail = await waitForMail(email);
    expect(mail.subject).toBe('You are invited to the Brinkmap workspace "Invitation workspace"');
    const link = mail.links.find((l) => l.startsWith(`${TEST_ORIGIN}/invitations/`))!;
    expect(link).toBeDefined();
    const token = tokenFrom(link);
    // Only the hash is stored: the database never holds a working link.
    const row = await db('invitations').where({ id: res.body.invitation.id }).first();
    expect(row.token_hash).toBe(tokenHash(token));
    expect(JSON.stringify(row)).not.toContain(token);

    // Opening the link signed out shows the invitation and offers sign-up.
    const visitor = new Client();
    const page = await visitor.get(new URL(link).pathname);
    expect(page.status).toBe(200);
    expect(page.text).toContain('Invitation workspace');
    expect(page.text).toContain('Create an account to join');

    await visitor.post('/api/auth/sign-up', { email, password: 'invitee-password', displayName: 'New Modeler' });
    const accept = await visitor.post(`/api/invitations/${token}/accept`);
    expect(accept.status).toBe(200);
    expect(accept.body).toEqual({ workspaceId: ws.workspaceId, role: 'modeler' });
    const membership = await db('memberships').where({ workspace_id: ws.workspaceId, user_id: (await visitor.get('/api/auth/me')).body.user.id }).first();
    expect(membership.role).toBe('modeler');
    const members = await ws.reviewer.get(`/api/workspaces/${ws.workspaceId}/members`);
    expect(members.body.members.find((m: { email: string }) => m.email === email).role).toBe('modeler');
    // The new member can now act as modeler in the workspace, not as owner.
    expect((await visitor.get(`/api/workspaces/${ws.workspaceId}`)).status).toBe(200);
    expect((await visitor.get(`/api/workspaces/${ws.workspaceId}/invitations`)).status).toBe(403);

    const again = await visitor.post(`/api/invitations/${token}/accept`);
    expect(again.status).toBe(410);
    expect(again.body.error.code).toBe('invitation_accepted');
  });

  it('the link page joins an existing signed-in account with the invited role (reviewer)', async () => {
    const ws = await workspaceWithRoles();
    const person = await signedUpClient();
    await ws.owner.post(`/api/workspaces/${ws.workspaceId}/invitations`, { email: person.user!.email, role: 'reviewer' });
    const link = (await waitForMail(person.user!.email)).links[0];
    const res = await person.request('POST', new URL(link).pathname, { form: {} });
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe('/');
    expect((await db('memberships').where({ workspace_id: ws.workspaceId, user_id: person.user!.id }).first()).role).toBe('reviewer');
    expect((await person.patch(`/api/workspaces/${ws.workspaceId}`, { name: 'Taken over' })).status).toBe(403);
  });

  it('someone signed in with another address cannot use the link (403, nothing joined)', async () => {
    const ws = await workspaceWithRoles();
    const email = uniqueEmail('intended');
    await ws.owner.post(`/api/workspaces/${ws.workspaceId}/invitations`, { email, role: 'owner' });
    const token = tokenFrom((await waitForMail(email)).links[0]);
    const interloper = await signedUpClient();
    const res = await interloper.post(`/api/invitations/${token}/accept`);
    expect(res.status).toBe(403);
    expect(res.body.error.message).toContain(email);
    expect(await db('memberships').where({ workspace_id: ws.workspaceId, user_id: interloper.user!.id }).first()).toBeUndefined();
  });

  it('a withdrawn invitation no longer joins (410)', async () => {
    const ws = await workspaceWithRoles();
    const person = await signedUpClient();
    const inv = await ws.owner.post(`/api/workspaces/${ws.workspaceId}/invitations`, { email: person.user!.email, role: 'modeler' });
    const token = tokenFrom((await waitForMail(person.user!.email)).links[0]);
    expect((await ws.owner.delete(`/api/workspaces/${ws.workspaceId}/invitations/${inv.body.invitation.id}`)).status).toBe(204);
    const res = await person.post(`/api/invitations/${token}/accept`);
    expect(res.status).toBe(410);
    expect(await db('memberships').where({ workspace_id: ws.workspaceId, user_id: person.user!.id }).first()).toBeUndefined();
  });

  it('inviting an existing member is a 409 and sends no mail', async () => {
    const ws = await workspaceWithRoles();
    const res = await ws.owner.post(`/api/workspaces/${ws.workspaceId}/invitations`, { email: ws.modeler.user!.email, role: 'reviewer' });
    expect(res.status).toBe(409);
    expect(await db('dev_mail').where('rcpt_to', 'like', `%${ws.modeler.user!.email}%`).first()).toBeUndefined();
  });

  it('the owner-only dev mail box lists the invitation with its link; other roles get 403', async () => {
    const ws = await workspaceWithRoles();
    const email = uniqueEmail('devbox');
    await ws.owner.post(`/api/workspaces/${ws.workspaceId}/invitations`, { email, role: 'reviewer' });
    await waitForMail(email);
    const page = await ws.owner.get(`/dev/mail?workspace=${ws.workspaceId}`);
    expect(page.status).toBe(200);
    expect(page.text).toContain(email);
    expect(page.text).toContain(`${TEST_ORIGIN}/invitations/`);
    expect((await ws.modeler.get(`/dev/mail?workspace=${ws.workspaceId}`)).status).toBe(403);
    const api = await ws.owner.get(`/api/dev/mail?workspace=${ws.workspaceId}`);
    expect(api.body.mails.some((m: { to: string }) => m.to.includes(email))).toBe(true);
  });

  it('the last owner cannot be demoted or removed (409), and the audit log records role changes', async () => {
    const ws = await workspaceWithRoles();
    const me = ws.owner.user!.id;
    expect((await ws.owner.patch(`/api/workspaces/${ws.workspaceId}/members/${me}`, { role: 'reviewer' })).status).toBe(409);
    expect((await ws.owner.delete(`/api/workspaces/${ws.workspaceId}/members/${me}`)).status).toBe(409);
    expect((await ws.owner.patch(`/api/workspaces/${ws.workspaceId}/members/${ws.reviewer.user!.id}`, { role: 'modeler' })).status).toBe(200);
    const audit = await ws.owner.get(`/api/workspaces/${ws.workspaceId}/audit`);
    const entry = audit.body.entries.find((e: { action: string }) => e.action === 'member.role_changed');
    expect(entry).toMatchObject({ actorId: me, targetId: ws.reviewer.user!.id, details: { from: 'reviewer', to: 'modeler' } });
  });
});
