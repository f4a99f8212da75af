import { z } from 'zod';
import { ROLES } from './roles.ts';

export const emailField = z
  .string({ required_error: 'is required', invalid_type_error: 'must be text' })
  .trim()
  .toLowerCase()
  .min(3, 'is required')
  .max(254, 'must be at most 254 characters')
  .email('must be an e-mail address');

export const newPasswordField = z
  .string({ required_error: 'is required', invalid_type_error: 'must be text' })
  .min(10, 'must be at least 10 characters')
  .max(200, 'must be at most 200 characters');

export const displayNameField = z
  .string({ required_error: 'is required', invalid_type_error: 'must be text' })
  .trim()
  .min(1, 'is required')
  .max(100, 'must be at most 100 characters');

export const roleField = z.enum(ROLES, {
  errorMap: () => ({ message: `must be one of ${ROLES.join(', ')}` }),
});

/** `next` after sign-in: only a same-site path, never another origin. */
export const nextField = z
  .string()
  .max(500)
  .regex(/^\/(?!\/)[^\s\\]*$/, 'must be a path on this site')
  .optional();

export const signUpSchema = z
  .object({ email: emailField, password: newPasswordField, displayName: displayNameField, next: nextField })
  .strict();

export const signInSchema = z
  .object({
    email: emailField,
    password: z.string({ required_error: 'is required', invalid_type_error: 'must be text' }).min(1, 'is required').max(200, 'must be at most 200 characters'),
    next: nextField,
  })
  .strict();

export const changePasswordSchema = z
  .object({
    currentPassword: z.string({ required_error: 'is required', invalid_type_error: 'must be text' }).min(1, 'is required').max(200, 'must be at most 200 characters'),
    newPassword: newPasswordField,
  })
  .strict();

export const workspaceNameField = z
  .string({ required_error: 'is required', invalid_type_error: 'must be text' })
  .trim()
  .min(1, 'is required')
  .max(100, 'must be at most 100 characters');

export const createWorkspaceSchema = z.object({ name: workspaceNameField }).strict();
export const renameWorkspaceSchema = z.object({ name: workspaceNameField }).strict();
export const inviteSchema = z.object({ email: emailField, role: roleField }).strict();
export const changeRoleSchema = z.object({ role: roleField }).strict();
export const switchWorkspaceSchema = z
  .object({ workspaceId: z.string().min(1, 'is required').max(32, 'must be at most 32 characters'), next: nextField })
  .strict();
