import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model/index';
import { classifyEdge, cutPoints, elementRoles, mergeBands, patternOf, progressOf, validateBandTag, BAND_TAG_NOTE_MAX, defaultRegimeOptions } from '../../../src/lib/regimes/index';
import type { Diagram, SpecialPoint } from '../../../src/lib/atlas/types';
import { cubicNetwork, cubicRoots } from './fixtures';

const unitRoles = { base: 0, threshold: 1, tipped: 2 };

describe('elementRoles', () => {
  it('elementRoles returns the cubic roots as base, threshold and tipped', () => {
    // Roots of r + x - x^3 by Viete's formula (fixtures.cubicRoots), a different method from the scan.
    const system = compileModelJson(cubicNetwork({ r: 0.2, nodes: ['u', 'v'], links: [{ from: 'u', to: 'v' }], nodeR: { v: -0.3 } }));
    const res = elementRoles(system, 0.5, [[-3, 3], [-3, 3]]);
    expect(res.diagnostics).toEqual([]);
    for (const [i, r] of [[0, 0.2], [1, -0.3]] as const) {
      const exact = cubicRoots(r);
      expect(Math.abs(res.roles[i]!.base - exact.a)).toBeLessThan(1e-13);
      expect(Math.abs(res.roles[i]!.threshold - exact.m)).toBeLessThan(1e-13);
      expect(Math.abs(res.roles[i]!.tipped - exact.c)).toBeLessThan(1e-13);
    }
  });

  it('elementRoles refuses a monostable node, naming it', () => {
    // r = 0.5 > 2/(3 sqrt 3) = 0.385: one root only (cusp fold value, Strogatz ch. 3).
    const system = compileModelJson(cubicNetwork({ r: 0, nodes: ['u', 'v'], links: [], nodeR: { v: 0.5 } }));
    const res = elementRoles(system, 0, [[-3, 3], [-3, 3]]);
    expect(res.roles[0]).not.toBeNull();
    expect(res.roles[1]).toBeNull();
    expect(res.diagnostics[0].message).toContain("node 'v'");
  });
});

describe('patternOf and progressOf', () => {
  it('patternOf puts a node above its threshold as tipped, at or below as base', () => {
    expect(patternOf([0.5, 1, 1.5], [unitRoles, unitRoles, unitRoles])).toEqual(['base', 'base', 'tipped']);
    expect(progressOf([0.5, 1, 2], [unitRoles, unitRoles, { base: -1, threshold: 0, tipped: 1 }])).toEqual([0.5, 1, 3]);
  });
});

describe('classifyEdge', () => {
  const roles = [unitRoles, unitRoles];
  const s = defaultRegimeOptions;
  it('classifyEdge calls an edge to a partially tipped state through a saddle with that node at threshold contained', () => {
    const c = classifyEdge([1, 0.05], [1, 0.1], ['tipped', 'base'], roles, s);
    expect(c.kind).toBe('contained');
  });
  it('classifyEdge calls an edge to all tipped through a saddle with one node near base cascading', () => {
    const c = classifyEdge([1.2, 0.2], [0.9, 0.4], ['tipped', 'tipped'], roles, s);
    expect(c.kind).toBe('cascading');
    expect(c.committed).toEqual([1]);
  });
  it('classifyEdge calls a symmetric saddle moving in step synchronous', () => {
    expect(classifyEdge([1, 1], [Math.SQRT1_2, Math.SQRT1_2], ['tipped', 'tipped'], roles, s).kind).toBe('synchronous');
  });
  it('classifyEdge refuses synchronous for uneven or mixed eigenvector components and for a node far past threshold', () => {
    // ratio 0.2 < 1/3
    expect(classifyEdge([1, 1], [1, 0.2], ['tipped', 'tipped'], roles, s)).toMatchObject({ kind: 'cascading', notTogether: 'uneven' });
    expect(classifyEdge([1, 1], [1, -0.9], ['tipped', 'tipped'], roles, s)).toMatchObject({ kind: 'cascading', notTogether: 'mixed-sign' });
    // tipped progress 2, far past means > 1 + 0.5 (2 - 1) = 1.5
    expect(classifyEdge([1.8, 1], [1, 1], ['tipped', 'tipped'], roles, s)).toMatchObject({ kind: 'cascading', notTogether: 'far-past' });
  });
  it('classifyEdge calls an edge cascading when the partially tipped end has a node that was at base at the saddle', () => {
    const three = [unitRoles, unitRoles, unitRoles];
    expect(classifyEdge([1, 0.1, 0], [1, 0.2, 0], ['tipped', 'tipped', 'base'], three, s).kind).toBe('cascading');
  });
});

describe('cutPoints and mergeBands', () => {
  const sp = (p: number, type: SpecialPoint['type']): SpecialPoint => ({ id: `${type}${p}`, type, p, x: [0], branches: [], evidence: { reason: 'test' } });
  const diagram = (pts: SpecialPoint[]): Diagram => ({ parameter: 'b', variables: ['x'], branches: [], bifurcations: pts, diagnostics: [], settings: {}, engineVersion: 't' });

  it('cutPoints merges coincident special points and keeps the ends', () => {
    const cuts = cutPoints(diagram([sp(0.5, 'pitchfork'), sp(0.2, 'saddle-node'), sp(0.2 + 1e-12, 'saddle-node'), sp(2, 'hopf')]), 0, 1);
    expect(cuts.map((c) => ({ p: c.p, types: c.types }))).toEqual([
      { p: 0, types: ['sweep-bound'] }, { p: 0.2, types: ['saddle-node'] }, { p: 0.5, types: ['pitchfork'] }, { p: 1, types: ['sweep-bound'] },
    ]);
    // Each cut carries the special points it was made of (the two saddle-nodes 1e-12 apart are one cut).
    expect(cuts.map((c) => c.points.map((q) => q.p))).toEqual([[], [0.2, 0.2 + 1e-12], [0.5], []]);
  });

  it('mergeBands joins adjacent equal labels and breaks at unlabelled intervals', () => {
    const l = (from: number, to: number, regime: 'weak' | 'strong' | null, reason = 'r') =>
      ({ from, to, fromBound: `c${from}`, toBound: `c${to}`, regime, reason, start: 'all-base' as const });
    const bands = mergeBands([l(0, 1, 'weak', 'a'), l(1, 2, 'weak', 'b'), l(2, 3, null), l(3, 4, 'weak'), l(4, 5, 'strong')]);
    expect(bands).toEqual([
      { from: 0, to: 2, regime: 'weak', bounds: ['c0', 'c2'], reason: 'a (the ways out change once inside the band without changing the label; see the escape graphs)' },
      { from: 3, to: 4, regime: 'weak', bounds: ['c3', 'c4'], reason: 'r' },
      { from: 4, to: 5, regime: 'strong', bounds: ['c4', 'c5'], reason: 'r' },
    ]);
  });
});

describe('validateBandTag', () => {
  it('validateBandTag accepts a tag and lower-cases the colour', () => {
    expect(validateBandTag({ from: 0, to: 0.1, name: 'calm lakes', colour: '#A1B2C3', note: 'checked by hand' }))
      .toEqual({ ok: true, tag: { from: 0, to: 0.1, name: 'calm lakes', colour: '#a1b2c3', note: 'checked by hand' } });
  });
  it('validateBandTag names the field of every problem', () => {
    const r = validateBandTag({ from: 1, to: 0.5, name: '', colour: 'red', note: 'x'.repeat(BAND_TAG_NOTE_MAX + 1) });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    const paths = r.errors.map((e) => e.path).sort();
    expect(paths).toEqual(['colour', 'name', 'note', 'to']);
    const r2 = validateBandTag({ from: 1, to: 0.5, name: 'n', colour: '#000000', note: '' });
    expect(r2).toEqual({ ok: false, errors: [{ path: 'to', message: 'must be greater than from' }] });
    const r3 = validateBandTag({ from: 0, to: 1, name: 'n', colour: '#000000', note: '', extra: 1 });
    expect(r3.ok).toBe(false);
  });
});
