import newtonRaphson from 'newton-raphson-method';

export interface ScalarRootOptions {
  /** Number of equal cells the interval is scanned in for sign changes (default 4000). */
  cells: number;
  /** Root accepted when |f(x)| <= residualTolerance * (1 + |x|) (default 1e-12). */
  residualTolerance: number;
  /** Bisection stops when the bracket is narrower than this times (1 + |x|) (default 1e-14). */
  bracketTolerance: number;
  /** Iteration cap for Newton and for bisection, each (default 200). */
  maxIterations: number;
}

export const defaultScalarRootOptions: ScalarRootOptions = {
  cells: 4000,
  residualTolerance: 1e-12,
  bracketTolerance: 1e-14,
  maxIterations: 200,
};

export interface ScalarRootResult {
  readonly roots: number[];
  /** Sign-change brackets where neither Newton nor bisection met the tolerance (root kept anyway). */
  readonly doubtful: number;
}

/**
 * All simple roots of a scalar function f on [lo, hi].
 * Method: scan `cells` equal cells for sign changes of f (and exact zeros at grid points), then in
 * each bracket run Newton's method (the `newton-raphson-method` package, analytic derivative df)
 * from the bracket midpoint; a Newton result outside the bracket or a failed iteration falls back
 * to bisection, which always converges on a sign change (Burden & Faires, Numerical Analysis, §2.1-2.3).
 * Assumptions: f continuous; roots closer together than one cell width, or double roots where
 * f touches zero without changing sign, are not found (they are reported by nothing; see docs).
 */
export function findScalarRoots(
  f: (x: number) => number,
  df: (x: number) => number,
  lo: number,
  hi: number,
  options: Partial<ScalarRootOptions> = {},
): ScalarRootResult {
  const o = { ...defaultScalarRootOptions, ...options };
  const roots: number[] = [];
  let doubtful = 0;
  const width = (hi - lo) / o.cells;
  let xa = lo;
  let fa = f(xa);
  if (fa === 0) roots.push(xa);
  for (let k = 1; k <= o.cells; k++) {
    const xb = k === o.cells ? hi : lo + k * width;
    const fb = f(xb);
    if (fb === 0) {
      roots.push(xb);
    } else if (Number.isFinite(fa) && Number.isFinite(fb) && fa * fb < 0) {
      const r = refineBracket(f, df, xa, xb, fa, fb, o);
      if (!r.ok) doubtful++;
      roots.push(r.x);
    }
    xa = xb;
    fa = fb;
  }
  return { roots, doubtful };
}

function refineBracket(
  f: (x: number) => number,
  df: (x: number) => number,
  a: number,
  b: number,
  fa: number,
  fb: number,
  o: ScalarRootOptions,
): { x: number; ok: boolean } {
  const mid = 0.5 * (a + b);
  const nr = newtonRaphson(f, df, mid, { tolerance: 1e-15, maxIterations: 50 });
  if (nr !== false && nr >= a && nr <= b && Math.abs(f(nr)) <= o.residualTolerance * (1 + Math.abs(nr))) {
    return { x: nr, ok: true };
  }
  let lo = a;
  let hi = b;
  let flo = fa;
  for (let i = 0; i < o.maxIterations; i++) {
    const m = 0.5 * (lo + hi);
    const fm = f(m);
    if (fm === 0) return { x: m, ok: true };
    if (flo * fm < 0) hi = m;
    else {
      lo = m;
      flo = fm;
    }
    if (hi - lo <= o.bracketTolerance * (1 + Math.abs(m))) return { x: 0.5 * (lo + hi), ok: true };
  }
  void fb;
  return { x: 0.5 * (lo + hi), ok: false };
}
