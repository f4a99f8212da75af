/** Role-matrix rows for GET /api/compare, spread into routeMatrix in route-matrix.ts. */
import { allow, type MatrixContext, type RouteCase, type Vars } from './route-matrix.ts';

let prepared: Promise<Vars> | null = null;
/** Two finished runs in workspace A, computed once. */
function twoFinishedRuns(c: MatrixContext): Promise<Vars> {
  prepared ??= (async () => {
    const { compareLakes, finishedRun } = await import('./compare-fixtures.ts');
    const a = await finishedRun(c.a, compareLakes(0.051));
    const b = await finishedRun(c.a, compareLakes(0.052));
    return { runs: `${a.runId},${b.runId}` };
  })();
  return prepared;
}

export const compareRoutes: RouteCase[] = [
  {
    route: '/api/compare', method: 'GET', prepare: twoFinishedRuns,
    path: (c, v) => `/api/compare?runs=${v.runs}&workspace=${c.a.workspaceId}`,
    expect: allow(200, 'owner', 'modeler', 'reviewer'),
  },
];
