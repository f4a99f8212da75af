/** Role-matrix rows for the editor's endpoints (issue 6): live validation and live preview. */
// Only a type import: route-matrix.ts spreads these rows in, so a value import would be circular.
import type { RouteCase } from './route-matrix.ts';

/**
 * Two identical cubic elements x' = r x - x^3 with symmetric diffusive coupling (the issue 3 test
 * model; invented numbers): small and valid, so the status shows only the authorization decision.
 */
export const twoCubicsDocument = {
  format: 'brinkmap/network-1',
  name: 'Two cubic elements (matrix test)',
  element: { variable: 'x', rate: 'r * x - x^3', parameters: { r: 1 } },
  nodes: [{ id: 'left' }, { id: 'right' }],
  links: [{ from: 'left', to: 'right', weight: 1, twoWay: true }],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 1 },
};

export const editorRoutes: RouteCase[] = [
  {
    route: '/api/validate', method: 'POST', path: (c) => `/api/validate?workspace=${c.a.workspaceId}`,
    body: () => ({ document: twoCubicsDocument }),
    expect: { signedOut: 401, outsider: 404, owner: 200, modeler: 200, reviewer: 200 },
    note: 'validation only, nothing stored: every member may check a document',
  },
  {
    route: '/api/preview', method: 'POST', path: (c) => `/api/preview?workspace=${c.a.workspaceId}`,
    body: () => ({ document: twoCubicsDocument }),
    expect: { signedOut: 401, outsider: 404, owner: 200, modeler: 200, reviewer: 403 },
    note: 'computes in the request, so only the roles that may start runs',
  },
];
