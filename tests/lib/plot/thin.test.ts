import { describe, expect, it } from 'vitest';
import { decimateByPixel, lttb, mustKeep, thinToBudget } from '../../../src/lib/plot/thin';

function fold(n: number) {
  // A parabola lying on its side, p = y², traced from y = −1 to 1: p falls to 0 at the middle and rises again.
  const xs: number[] = [], ys: number[] = [];
  for (let i = 0; i < n; i++) { const y = -1 + (2 * i) / (n - 1); xs.push(y * y); ys.push(y + 0.3 * Math.sin(9 * y)); }
  return { xs, ys };
}

describe('lttb', () => {
  it('returns exactly the budget, ascending, with first and last point', () => {
    const { xs, ys } = fold(1001);
    const k = lttb(xs, ys, 50);
    expect(k.length).toBe(50);
    expect(k[0]).toBe(0);
    expect(k[49]).toBe(1000);
    for (let i = 1; i < k.length; i++) expect(k[i]).toBeGreaterThan(k[i - 1]);
  });
  it('keeps an isolated spike (largest triangle) — the property Steinarsson 2013 §4.2 designs it for', () => {
    const xs = Array.from({ length: 100 }, (_, i) => i), ys = xs.map((i) => (i === 37 ? 50 : 0));
    expect(lttb(xs, ys, 10)).toContain(37);
  });
  it('returns everything when the budget is not smaller than the input', () => {
    expect(lttb([0, 1, 2], [0, 1, 0], 5)).toEqual([0, 1, 2]);
  });
});

describe('mustKeep / thinToBudget', () => {
  it('mustKeep finds the fold where x turns back, and the y extremes', () => {
    const { xs, ys } = fold(1001);
    const keep = mustKeep(xs, ys);
    expect(keep).toContain(500); // x = y² is smallest at y = 0, the middle point
    let iMin = 0, iMax = 0;
    ys.forEach((y, i) => { if (y < ys[iMin]) iMin = i; if (y > ys[iMax]) iMax = i; });
    expect(keep).toContain(iMin);
    expect(keep).toContain(iMax);
  });
  it('thinToBudget keeps the fold and extremes and stays within budget + anchors', () => {
    const { xs, ys } = fold(50_001);
    const keep = thinToBudget(xs, ys, 800);
    const anchors = mustKeep(xs, ys);
    for (const a of anchors) expect(keep).toContain(a);
    expect(keep.length).toBeLessThanOrEqual(800 + anchors.length);
    expect(new Set(keep).size).toBe(keep.length);
  });
});

describe('decimateByPixel', () => {
  it('drops points closer than minDist to the last kept one but keeps the ends and the fold', () => {
    const { xs, ys } = fold(50_001);
    const sx = xs.map((v) => v * 600), sy = ys.map((v) => v * 300);
    const keep = decimateByPixel(sx, sy, 1);
    expect(keep.length).toBeLessThan(5000);
    expect(keep[0]).toBe(0);
    expect(keep[keep.length - 1]).toBe(50_000);
    expect(keep).toContain(25_000);
    for (let k = 1; k < keep.length - 1; k++) {
      const a = keep[k - 1], b = keep[k];
      const far = Math.hypot(sx[b] - sx[a], sy[b] - sy[a]) >= 1;
      expect(far || mustKeep(sx, sy).includes(b)).toBe(true);
    }
  });
});
