import { describe, expect, it } from 'vitest';
import { availableProjections, PlotInputError, project, projectionFromKey, projectionKey } from '../../../src/lib/plot/projection';

describe('project', () => {
  const x = [3, -4, 1];
  it('node returns that component', () => {
    expect(project(x, { kind: 'node', index: 1 })).toBe(-4);
  });
  it('mean is the arithmetic mean (3 − 4 + 1)/3 = 0', () => {
    expect(project(x, { kind: 'mean' })).toBeCloseTo(0, 15);
  });
  it('norm is the Euclidean norm √(9 + 16 + 1) = √26 (hand computation)', () => {
    expect(project(x, { kind: 'norm' })).toBeCloseTo(Math.sqrt(26), 14);
  });
  it('norm does not overflow where the squares would (1e200, 1e200 → √2·1e200)', () => {
    expect(project([1e200, 1e200], { kind: 'norm' }) / 1e200).toBeCloseTo(Math.SQRT2, 12);
  });
  it('tipped counts nodes strictly above their own threshold', () => {
    expect(project(x, { kind: 'tipped', thresholds: [2.9, 0, 1] })).toBe(1);
    expect(project(x, { kind: 'tipped', thresholds: [0, -5, 0] })).toBe(3);
  });
  it('tipped with the wrong number of thresholds throws a PlotInputError naming thresholds', () => {
    expect(() => project(x, { kind: 'tipped', thresholds: [0] })).toThrow(PlotInputError);
    expect(() => project(x, { kind: 'tipped', thresholds: [0] })).toThrow(/thresholds/);
  });
  it('node out of range throws naming projection.index', () => {
    expect(() => project(x, { kind: 'node', index: 3 })).toThrow(/projection\.index/);
  });
  it('does not mutate the state', () => {
    const y = [1, 2];
    project(y, { kind: 'norm' });
    expect(y).toEqual([1, 2]);
  });
});

describe('availableProjections', () => {
  it('offers the tipped count only when one threshold per node is given', () => {
    const keys = (t?: number[]) => availableProjections({ variables: ['a', 'b'] }, t).map((p) => p.key);
    expect(keys()).toEqual(['node:0', 'node:1', 'mean', 'norm']);
    expect(keys([0, 0])).toEqual(['node:0', 'node:1', 'mean', 'tipped', 'norm']);
    expect(keys([0])).not.toContain('tipped');
  });
  it('keys round-trip through projectionFromKey', () => {
    for (const p of availableProjections({ variables: ['a', 'b', 'c'] }, [0, 0, 0])) {
      expect(projectionKey(projectionFromKey(p.key, [0, 0, 0]))).toBe(p.key);
    }
  });
});
