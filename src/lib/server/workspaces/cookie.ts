/** Cookie remembering the active workspace (set by the switcher, read by src/middleware.ts). */
export const WORKSPACE_COOKIE = 'bm_workspace';
