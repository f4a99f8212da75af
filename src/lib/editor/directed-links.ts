/**
 * How many directed links a link list stands for: a two-way link between two nodes is two (one each
 * way, as the engine couples them), a two-way self-link one. "3 links" for a two-way pair and a
 * one-way link would understate what the engine computes.
 */
export function directedLinkCount(links: readonly { from?: unknown; to?: unknown; twoWay?: unknown }[]): { directed: number; twoWay: number } {
  let directed = 0;
  let twoWay = 0;
  for (const l of links) {
    if (l.twoWay === true && l.from !== l.to) {
      directed += 2;
      twoWay += 1;
    } else directed += 1;
  }
  return { directed, twoWay };
}

/** "4 directed links (1 two-way pair)", "1 directed link". */
export function describeLinkCount(links: readonly { from?: unknown; to?: unknown; twoWay?: unknown }[]): string {
  const { directed, twoWay } = directedLinkCount(links);
  const base = `${directed} directed link${directed === 1 ? '' : 's'}`;
  return twoWay > 0 ? `${base} (${twoWay} two-way pair${twoWay === 1 ? '' : 's'} counted both ways)` : base;
}
