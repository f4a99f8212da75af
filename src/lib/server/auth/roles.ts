/** Roles a member can hold in a workspace, and what each may do (see DEVELOPERS.md). */
export const ROLES = ['owner', 'modeler', 'reviewer'] as const;
export type Role = (typeof ROLES)[number];

/** Roles allowed to change models, runs, results and band tags. */
export const EDITOR_ROLES: readonly Role[] = ['owner', 'modeler'];
/** Every role reads everything in its workspace. */
export const READER_ROLES: readonly Role[] = ROLES;

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}
