/**
 * Which combinations of element equilibria start a trace when there are too many to use them all
 * (docs/numerics.md §12). A *pattern* gives every node one of the roots of its uncoupled element,
 * sorted: index 0 is the node's base state, the last index its tipped state, anything between a
 * middle root (the threshold of a bistable element). A node is *off base* in a pattern when it sits
 * at any root but its lowest: tipped, or at its threshold.
 *
 * At zero coupling the Jacobian is diagonal with the elements' slopes (negative at base and tipped
 * roots, positive at thresholds), so a pattern with j threshold nodes is a saddle of index j. Under
 * coupling the branches through them change index: the exits of the all-base state at intermediate
 * and strong coupling run through index-1 saddles on branches that start, at zero coupling, at
 * patterns with two or three nodes at their thresholds (docs/numerics.md §12 shows it on a 6-node
 * ring). What a cascade needs is therefore counted by the nodes that move off base, tipped or
 * halfway, not by the tipped ones alone.
 *
 * The restricted set for a budget of starts, with k the largest number of off-base nodes that fits:
 *   1. all-base and all-tipped;
 *   2. every pattern with at most k nodes off base (for three roots per node: sum_{j<=k} C(n, j) 2^j);
 *   3. all-tipped's neighbours: one node at a middle root, all others tipped (for recovery).
 */

/** Binomial coefficient C(n, k) as a double (exact below 2^53; only compared against budgets). */
export function binomial(n: number, k: number): number {
  if (k < 0 || k > n) return 0;
  let c = 1;
  const m = Math.min(k, n - k);
  for (let j = 1; j <= m; j++) c = (c * (n - m + j)) / j;
  return Math.round(c);
}

export interface RestrictedCounts {
  /** Patterns with at most k nodes off base (all-base included). */
  readonly withinK: number;
  /** Of those, the ones with every node at base or tipped (stable at zero coupling). */
  readonly stable: number;
  /** All-tipped and its neighbouring saddles, where not already within k. */
  readonly nearAllTipped: number;
  readonly total: number;
}

/**
 * Number of patterns in the restricted set for k (see the file header), from the roots per node:
 * the patterns with exactly j nodes off base number e_j(m_1 - 1, ..., m_n - 1), the elementary
 * symmetric polynomial of the nodes' off-base choices (a node with m roots has m - 1 of them).
 */
export function restrictedCounts(rootCounts: readonly number[], k: number): RestrictedCounts {
  const n = rootCounts.length;
  const kk = Math.max(0, Math.min(k, n));
  // e[j] after processing the nodes so far: e_j of their choices (all), s[j]: tipped choices only.
  const e = new Array<number>(kk + 1).fill(0);
  const s = new Array<number>(kk + 1).fill(0);
  e[0] = 1;
  s[0] = 1;
  for (const m of rootCounts) {
    for (let j = kk; j >= 1; j--) {
      e[j] += e[j - 1] * (m - 1);
      s[j] += s[j - 1] * (m >= 2 ? 1 : 0);
    }
  }
  let withinK = 0;
  let stable = 0;
  for (let j = 0; j <= kk; j++) { withinK += e[j]; stable += s[j]; }
  const offBaseTop = rootCounts.filter((m) => m >= 2).length;
  let near = 0;
  // All-tipped has every node with two or more roots off base.
  if (offBaseTop > kk) near += 1;
  for (const m of rootCounts) {
    const middles = Math.max(0, m - 2);
    if (middles === 0) continue;
    // One node at a middle root, the others tipped: offBaseTop nodes off base.
    if (offBaseTop > kk) near += middles;
  }
  return { withinK, stable, nearAllTipped: near, total: withinK + near };
}

export interface RestrictedSelection {
  /** Largest number of off-base nodes k whose restricted set fits (see chooseMaxOffBase). */
  readonly maxOffBase: number;
  readonly counts: RestrictedCounts;
  /** Root index per node, one array per start, in the order of restrictedPatterns (all-base first). */
  readonly patterns: number[][];
}

/**
 * k for a budget: the largest k whose restricted set leaves `reserve` starts of the budget free
 * (room for the states the escape graph adds), else the largest that fits at all, else 0.
 */
export function chooseMaxOffBase(rootCounts: readonly number[], budget: number, reserve: number): number {
  const n = rootCounts.length;
  let best = -1;
  for (let k = 0; k <= n; k++) {
    if (restrictedCounts(rootCounts, k).total + reserve > budget) break;
    best = k;
  }
  if (best >= 0) return best;
  for (let k = 0; k <= n; k++) {
    if (restrictedCounts(rootCounts, k).total > budget) break;
    best = k;
  }
  return Math.max(best, 0);
}

/**
 * The restricted set for k (file header), as root indices per node, deterministic: all-base,
 * all-tipped, then the patterns with 1, 2, ..., k nodes off base (node sets in lexicographic order,
 * within a set the root indices counted up with the last node fastest), then all-tipped's
 * neighbours by node. At most `limit` patterns (the budget when even k = 0 does not fit).
 */
export function restrictedPatterns(rootCounts: readonly number[], k: number, limit = Infinity): number[][] {
  const n = rootCounts.length;
  const top = rootCounts.map((m) => m - 1);
  const out: number[][] = [];
  const seen = new Set<string>();
  const push = (pat: number[]): boolean => {
    if (out.length >= limit) return false;
    const key = pat.join(',');
    if (!seen.has(key)) {
      seen.add(key);
      out.push(pat);
    }
    return out.length < limit;
  };
  const base = new Array<number>(n).fill(0);
  if (!push(base.slice())) return out;
  if (!push(top.slice())) return out;
  const movable: number[] = [];
  for (let i = 0; i < n; i++) if (rootCounts[i] >= 2) movable.push(i);
  for (let j = 1; j <= Math.min(k, movable.length); j++) {
    const idx = Array.from({ length: j }, (_, q) => q);
    for (;;) {
      const set = idx.map((q) => movable[q]);
      // Every choice of off-base root (1 .. m - 1) per node of the set, last node fastest.
      const choice = new Array<number>(j).fill(1);
      for (;;) {
        const pat = base.slice();
        set.forEach((i, q) => { pat[i] = choice[q]; });
        if (!push(pat)) return out;
        let q = j - 1;
        while (q >= 0 && choice[q] === top[set[q]]) { choice[q] = 1; q--; }
        if (q < 0) break;
        choice[q]++;
      }
      let q = j - 1;
      while (q >= 0 && idx[q] === movable.length - j + q) q--;
      if (q < 0) break;
      idx[q]++;
      for (let r = q + 1; r < j; r++) idx[r] = idx[r - 1] + 1;
    }
  }
  for (let i = 0; i < n; i++) {
    for (let mid = 1; mid <= rootCounts[i] - 2; mid++) {
      const pat = top.slice();
      pat[i] = mid;
      if (!push(pat)) return out;
    }
  }
  return out;
}

/** The restricted selection for a budget (chooseMaxOffBase, then restrictedPatterns capped at the budget). */
export function selectRestricted(rootCounts: readonly number[], budget: number, reserve: number): RestrictedSelection {
  const k = chooseMaxOffBase(rootCounts, budget, reserve);
  return { maxOffBase: k, counts: restrictedCounts(rootCounts, k), patterns: restrictedPatterns(rootCounts, k, budget) };
}

/** "3^20" when every node has the same number of roots, else the factors ("3^18 × 1^2"). */
export function patternSpace(rootCounts: readonly number[]): string {
  const groups = new Map<number, number>();
  for (const m of rootCounts) groups.set(m, (groups.get(m) ?? 0) + 1);
  return [...groups.entries()].sort((a, b) => b[0] - a[0]).map(([m, c]) => `${m}^${c}`).join(' × ');
}

/** Product of the root counts (may exceed 2^53; only compared). */
export function patternCount(rootCounts: readonly number[]): number {
  let c = 1;
  for (const m of rootCounts) c *= m;
  return c;
}
