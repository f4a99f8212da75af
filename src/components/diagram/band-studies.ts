/**
 * Links from a band of the diagram to the escape studies of the same model version (runs of kind
 * 'escapes', found by the run page's server code), and what each study predicted inside the band:
 * the weak-noise prediction's escape orders at the stored parameter value nearest to the band's
 * representative parameter (the value where the band's escape graph was taken, else where its
 * exits were read, else its midpoint), among the study's values inside the band. Pure, so
 * tests/lib/plot/band-studies.test.ts checks it without a browser.
 */

/** One finished escape study of the run's version, as the run page passes it to the island. */
export interface VersionStudy {
  /** The escape run's id (its page is /runs/<runId>). */
  readonly runId: number;
  readonly noise: number;
  readonly start: string;
  readonly paths: number | null;
  /** Every stored value in parameter order, with the prediction's escape orders (most probable first). */
  readonly points: readonly { readonly p: number; readonly orders: readonly { readonly order: readonly string[]; readonly probability: number | null }[] }[];
}

export interface BandStudyLink {
  readonly runId: number;
  readonly href: string;
  /** "Escape study (noise σ = 0.45, from all-base)". */
  readonly label: string;
  /** The band's representative parameter the value was chosen for. */
  readonly representative: number;
  /** The stored value used, inside the band and nearest to the representative one; null when none lies inside. */
  readonly at: { readonly p: number; readonly orders: readonly { readonly order: readonly string[]; readonly probability: number | null }[] } | null;
}

/** The band's representative parameter: its escape graph's value, else where its exits were read, else its midpoint. */
export function representativeParameter(band: { from: number; to: number; exitsAt?: number }, graphP?: number): number {
  const lo = Math.min(band.from, band.to);
  const hi = Math.max(band.from, band.to);
  const inside = (p: number | undefined): p is number => typeof p === 'number' && Number.isFinite(p) && p >= lo && p <= hi;
  if (inside(graphP)) return graphP;
  if (inside(band.exitsAt)) return band.exitsAt;
  return (lo + hi) / 2;
}

/** One link per study (newest first, as given), each with the stored value nearest to the representative parameter inside the band. */
export function bandStudyLinks(band: { from: number; to: number; exitsAt?: number }, studies: readonly VersionStudy[], graphP?: number): BandStudyLink[] {
  const lo = Math.min(band.from, band.to);
  const hi = Math.max(band.from, band.to);
  const rep = representativeParameter(band, graphP);
  return studies.map((s) => {
    let best: VersionStudy['points'][number] | null = null;
    for (const pt of s.points) {
      if (!(pt.p >= lo && pt.p <= hi) || pt.orders.length === 0) continue;
      // Nearest wins; on a tie the lower value, so the choice does not depend on the order given.
      if (!best || Math.abs(pt.p - rep) < Math.abs(best.p - rep) || (Math.abs(pt.p - rep) === Math.abs(best.p - rep) && pt.p < best.p)) best = pt;
    }
    const orders = best ? [...best.orders].sort((a, b) => (b.probability ?? -1) - (a.probability ?? -1)) : [];
    return {
      runId: s.runId,
      href: `/runs/${s.runId}`,
      label: `Escape study (noise σ = ${s.noise}${s.start === 'all-base' ? '' : `, from ${s.start}`})`,
      representative: rep,
      at: best ? { p: best.p, orders } : null,
    };
  });
}
