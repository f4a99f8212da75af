import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model/index.ts';
import { traceDiagram, type Diagram } from '../../../src/lib/atlas/index.ts';
import {
  decodeDiagram, decodeDiagramText, diagramBlobInfo, encodeDiagram, isEncodedDiagram, StoredDiagramError,
} from '../../../src/lib/storage/index.ts';

/** Invented two-node cubic network (x' = r + x - x^3 per node, diffusive two-way link), a short sweep. */
function twoCubics(extra: Record<string, unknown> = {}) {
  const system = compileModelJson({
    format: 'brinkmap/network-1', name: 'two invented cubic nodes',
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
    nodes: [{ id: 'a', parameters: { r: 0.05 } }, { id: 'b', parameters: { r: 0.15 } }],
    links: [{ from: 'a', to: 'b', weight: 1, twoWay: true }],
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to: 0.5 },
  });
  return traceDiagram(system, extra);
}

/** Every number of a and b, compared with Object.is (so 0 and -0 and NaN count as they are). */
function sameNumbers(a: Diagram, b: Diagram): boolean {
  for (let i = 0; i < a.branches.length; i++) {
    const pa = a.branches[i].points;
    const pb = b.branches[i].points;
    if (pa.length !== pb.length) return false;
    for (let j = 0; j < pa.length; j++) {
      if (!Object.is(pa[j].p, pb[j].p) || !Object.is(pa[j].unstable, pb[j].unstable)) return false;
      if (pa[j].x.some((v, k) => !Object.is(v, pb[j].x[k]))) return false;
    }
  }
  return true;
}

const point = (p: number, x: number[], unstable = 0) => ({ p, x, unstable });
function handMade(points: unknown[]): Diagram {
  return {
    parameter: 'beta', variables: ['a', 'b'],
    branches: [{ id: 'b1', points: points as Diagram['branches'][number]['points'], origin: { kind: 'start' }, ends: ['sweep-bound', 'sweep-bound'] }],
    bifurcations: [], diagnostics: [{ level: 'info', code: 'note', message: 'invented test diagram' }], settings: { from: 0, to: 1 }, engineVersion: 'test',
  };
}

describe('encodeDiagram / decodeDiagramText', () => {
  it('a traced diagram comes back as exactly the bytes JSON.stringify wrote, and as deep-equal objects', () => {
    const d = twoCubics();
    const blob = encodeDiagram(d);
    expect(diagramBlobInfo(blob).layout).toBe('columns');
    expect(decodeDiagramText(blob)).toBe(JSON.stringify(d));
    const back = decodeDiagram(blob);
    expect(back).toEqual(d);
    expect(sameNumbers(back, d)).toBe(true);
  });

  it('eigenvalues stored with every point (storeEigenvalues) come back exactly too', () => {
    const d = twoCubics({ storeEigenvalues: true });
    expect(d.branches[0].points[0].eigenvalues?.length).toBe(2);
    const blob = encodeDiagram(d);
    expect(diagramBlobInfo(blob).layout).toBe('columns');
    expect(decodeDiagramText(blob)).toBe(JSON.stringify(d));
    expect(decodeDiagram(blob)).toEqual(d);
  });

  it('is smaller than the JSON text of the same diagram (the reason to store it)', () => {
    const d = twoCubics();
    expect(encodeDiagram(d).byteLength).toBeLessThan(new TextEncoder().encode(JSON.stringify(d)).byteLength / 2);
  });

  it('keeps -0, NaN and infinities exactly in the objects and writes them as JSON.stringify does (0 and null)', () => {
    const d = handMade([point(-0, [Number.NaN, Infinity]), point(0.5, [-Infinity, -0], 1), point(1, [1e-300, 5e-324], 2)]);
    const blob = encodeDiagram(d);
    expect(diagramBlobInfo(blob).layout).toBe('columns');
    expect(decodeDiagramText(blob)).toBe(JSON.stringify(d));
    const back = decodeDiagram(blob);
    expect(Object.is(back.branches[0].points[0].p, -0)).toBe(true);
    expect(Number.isNaN(back.branches[0].points[0].x[0])).toBe(true);
    expect(sameNumbers(back, d)).toBe(true);
  });

  it('a diagram without branches or points round-trips', () => {
    const d = { ...handMade([]), branches: [] };
    const blob = encodeDiagram(d);
    expect(decodeDiagramText(blob)).toBe(JSON.stringify(d));
    expect(decodeDiagram(blob)).toEqual(d);
  });

  it('points the columns cannot carry (extra key, other key order, text in x, differing lengths) fall back to compressed JSON text, still exact', () => {
    const odd = [
      [point(0, [1, 2]), { ...point(0.1, [1, 2]), note: 'extra' }],
      [point(0, [1, 2]), { x: [1, 2], p: 0.1, unstable: 0 }],
      [point(0, [1, 2]), point(0.1, [1, 'two' as unknown as number])],
      [point(0, [1, 2]), point(0.1, [1, 2, 3])],
      [point(0, [1, 2]), { ...point(0.1, [1, 2]), eigenvalues: [{ im: 0, re: 1 }] }],
    ];
    for (const points of odd) {
      const d = handMade(points);
      const blob = encodeDiagram(d);
      expect(diagramBlobInfo(blob).layout).toBe('json');
      expect(decodeDiagramText(blob)).toBe(JSON.stringify(d));
      expect(decodeDiagram(blob)).toEqual(JSON.parse(JSON.stringify(d)));
    }
  });

  it('a key holding undefined is left out, as JSON.stringify leaves it out', () => {
    const d = handMade([{ ...point(0, [1, 2]), eigenvalues: undefined }, point(0.1, [1, 2])]);
    const blob = encodeDiagram(d);
    expect(diagramBlobInfo(blob).layout).toBe('columns');
    expect(decodeDiagramText(blob)).toBe(JSON.stringify(d));
  });
});

describe('the stored header', () => {
  it('starts with "BMDG", format version 1 and the payload length', () => {
    const d = twoCubics();
    const blob = encodeDiagram(d);
    expect(new TextDecoder().decode(blob.subarray(0, 4))).toBe('BMDG');
    expect(blob[4]).toBe(1);
    const info = diagramBlobInfo(blob);
    expect(info.storedBytes).toBe(blob.byteLength);
    expect(info.payloadBytes).toBeGreaterThan(blob.byteLength); // compressed
    expect(isEncodedDiagram(blob)).toBe(true);
    expect(isEncodedDiagram(new TextEncoder().encode(JSON.stringify(d)))).toBe(false);
  });

  it('a damaged, foreign or newer blob is refused with StoredDiagramError saying why', () => {
    const blob = encodeDiagram(twoCubics());
    const damaged = blob.slice();
    damaged[damaged.length - 20] ^= 0xff;
    expect(() => decodeDiagram(damaged)).toThrow(StoredDiagramError);
    expect(() => decodeDiagram(damaged)).toThrow(/damaged/);
    expect(() => decodeDiagram(new TextEncoder().encode('{"parameter":"beta"}'))).toThrow(/header is missing/);
    const newer = blob.slice();
    newer[4] = 2;
    expect(() => decodeDiagramText(newer)).toThrow(/format version 2; this code reads version 1/);
    const truncated = blob.slice(0, blob.length - 100);
    expect(() => decodeDiagram(truncated)).toThrow(StoredDiagramError);
  });
});
