/**
 * Invitations: an owner invites an e-mail address with a role; the mail carries a link with a random
 * token (only its SHA-256 is stored); opening it while signed in with that address joins the workspace.
 */
import { createHash, randomBytes } from 'node:crypto';
import { db } from '../db.ts';
import { newId } from '../ids.ts';
import { audit } from '../audit.ts';
import { conflict, forbidden, HttpError, notFound } from '../http.ts';
import { serverEnv } from '../env.ts';
import { sendMail } from '../mail/mailer.ts';
import type { Role } from '../auth/roles.ts';

const VALID_DAYS = 7;

export interface Invitation {
  id: string;
  workspaceId: string;
  email: string;
  role: Role;
  invitedBy: string | null;
  createdAt: string;
  expiresAt: string;
  status: 'pending' | 'accepted' | 'revoked' | 'expired';
}

export function tokenHash(token: string): string {
  return createHash('sha256').update(token).digest('hex');
}

function status(r: { accepted_at: Date | null; revoked_at: Date | null; expires_at: Date }): Invitation['status'] {
  if (r.accepted_at) return 'accepted';
  if (r.revoked_at) return 'revoked';
  if (new Date(r.expires_at).getTime() <= Date.now()) return 'expired';
  return 'pending';
}

function toInvitation(r: Record<string, any>): Invitation {
  return {
    id: r.id,
    workspaceId: r.workspace_id,
    email: r.email,
    role: r.role,
    invitedBy: r.invited_by,
    createdAt: new Date(r.created_at).toISOString(),
    expiresAt: new Date(r.expires_at).toISOString(),
    status: status(r as never),
  };
}

export function invitationLink(token: string): string {
  return `${serverEnv().publicOrigin}/invitations/${token}`;
}

export async function createInvitation(input: { workspaceId: string; email: string; role: Role; invitedBy: { id: string; displayName: string } }): Promise<Invitation> {
  const already = await db('memberships as m')
    .join('users as u', 'u.id', 'm.user_id')
    .where({ 'm.workspace_id': input.workspaceId, 'u.email': input.email })
    .first('m.role');
  if (already) throw conflict(`${input.email} is already a member of this workspace (${already.role}).`);
  const workspace = await db('workspaces').where({ id: input.workspaceId }).first('name');
  if (!workspace) throw notFound('No such workspace.');

  const token = randomBytes(32).toString('base64url');
  const id = newId();
  const expiresAt = new Date(Date.now() + VALID_DAYS * 24 * 3600 * 1000);
  await db.transaction(async (trx) => {
    // A new invitation to the same address replaces any pending one.
    await trx('invitations')
      .where({ workspace_id: input.workspaceId, email: input.email })
      .whereNull('accepted_at')
      .whereNull('revoked_at')
      .update({ revoked_at: new Date() });
    await trx('invitations').insert({
      id,
      workspace_id: input.workspaceId,
      email: input.email,
      role: input.role,
      token_hash: tokenHash(token),
      invited_by: input.invitedBy.id,
      expires_at: expiresAt,
    });
    await audit({ workspaceId: input.workspaceId, actorId: input.invitedBy.id, action: 'invitation.created', targetType: 'invitation', targetId: id, details: { email: input.email, role: input.role } }, trx);
  });

  const link = invitationLink(token);
  try {
    await sendMail({
      to: input.email,
      subject: `You are invited to the Brinkmap workspace "${workspace.name}"`,
      text:
        `${input.invitedBy.displayName} invites you to the Brinkmap workspace "${workspace.name}" as ${input.role}.\n\n` +
        `Open this link to join (valid for ${VALID_DAYS} days):\n${link}\n\n` +
        `If you did not expect this, ignore this mail.\n`,
      html:
        `<p>${escapeHtml(input.invitedBy.displayName)} invites you to the Brinkmap workspace <strong>${escapeHtml(workspace.name)}</strong> as <strong>${input.role}</strong>.</p>` +
        `<p><a href="${link}">Join the workspace</a> (valid for ${VALID_DAYS} days)</p><p>If you did not expect this, ignore this mail.</p>`,
    });
  } catch (err) {
    // The invitation must not stay usable-but-unsent; take it back and say so.
    await db('invitations').where({ id }).update({ revoked_at: new Date() });
    console.error('[brinkmap] invitation mail failed', err);
    throw new HttpError(502, 'mail_failed', 'The invitation mail could not be sent; check the SMTP settings (SMTP_URL).');
  }
  return toInvitation((await db('invitations').where({ id }).first())!);
}

export async function listInvitations(workspaceId: string): Promise<Invitation[]> {
  const rows = await db('invitations').where({ workspace_id: workspaceId }).orderBy('created_at', 'desc').limit(200);
  return rows.map(toInvitation);
}

export async function revokeInvitation(workspaceId: string, invitationId: string, actorId: string): Promise<void> {
  await db.transaction(async (trx) => {
    const row = await trx('invitations').where({ id: invitationId, workspace_id: workspaceId }).forUpdate().first();
    if (!row) throw notFound('No such invitation in this workspace.');
    if (status(row) !== 'pending') throw conflict(`This invitation is already ${status(row)}.`);
    await trx('invitations').where({ id: invitationId }).update({ revoked_at: new Date() });
    await audit({ workspaceId, actorId, action: 'invitation.revoked', targetType: 'invitation', targetId: invitationId, details: { email: row.email } }, trx);
  });
}

export interface InvitationView {
  invitation: Invitation;
  workspaceName: string;
  invitedByName: string | null;
}

/** The invitation behind a link token, for the landing page; null when the token is unknown. */
export async function findByToken(token: string): Promise<InvitationView | null> {
  if (!/^[A-Za-z0-9_-]{20,100}$/.test(token)) return null;
  const row = await db('invitations as i')
    .join('workspaces as w', 'w.id', 'i.workspace_id')
    .leftJoin('users as u', 'u.id', 'i.invited_by')
    .where('i.token_hash', tokenHash(token))
    .first('i.*', 'w.name as workspace_name', 'u.display_name as invited_by_name');
  if (!row) return null;
  return { invitation: toInvitation(row), workspaceName: row.workspace_name, invitedByName: row.invited_by_name };
}

/** Joins the signed-in user to the invitation's workspace with the invited role. */
export async function acceptInvitation(token: string, user: { id: string; email: string }): Promise<{ workspaceId: string; role: Role }> {
  if (!/^[A-Za-z0-9_-]{20,100}$/.test(token)) throw notFound('This invitation link is not valid.');
  return db.transaction(async (trx) => {
    const row = await trx('invitations').where({ token_hash: tokenHash(token) }).forUpdate().first();
    if (!row) throw notFound('This invitation link is not valid.');
    const s = status(row);
    if (s !== 'pending') throw new HttpError(410, 'invitation_' + s, `This invitation is ${s}; ask the workspace owner for a new one.`);
    if (row.email.toLowerCase() !== user.email.toLowerCase()) {
      throw forbidden(`This invitation was sent to ${row.email}; sign in with that address to accept it.`);
    }
    const existing = await trx('memberships').where({ workspace_id: row.workspace_id, user_id: user.id }).first('role');
    if (!existing) {
      await trx('memberships').insert({ workspace_id: row.workspace_id, user_id: user.id, role: row.role });
    }
    await trx('invitations').where({ id: row.id }).update({ accepted_at: new Date(), accepted_by: user.id });
    await audit({ workspaceId: row.workspace_id, actorId: user.id, action: 'invitation.accepted', targetType: 'invitation', targetId: row.id, details: { role: existing?.role ?? row.role } }, trx);
    return { workspaceId: row.workspace_id as string, role: (existing?.role ?? row.role) as Role };
  });
}

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}
