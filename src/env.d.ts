/// <reference types="astro/client" />

declare namespace App {
  interface User {
    id: string;
    email: string;
    displayName: string;
  }
  interface ActiveWorkspace {
    id: string;
    name: string;
  }
  interface Locals {
    /** Signed-in user, or null. */
    user: User | null;
    /** lucia session id of the request, or null. */
    sessionId: string | null;
    /** Every workspace the user belongs to, with the role there (for the switcher). */
    memberships: { workspaceId: string; workspaceName: string; role: import('./lib/server/auth/roles').Role }[];
    /** The active workspace: ?workspace=<id>, else the X-Workspace header, else the bm_workspace cookie, else the first membership. Null when none or not a member. */
    workspace: ActiveWorkspace | null;
    /** The user's role in the active workspace. */
    role: import('./lib/server/auth/roles').Role | null;
    /** Client address (X-Forwarded-For only when TRUST_PROXY=1). */
    clientAddress: string;
  }
}
