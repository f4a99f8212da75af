import { describe, expect, it } from 'vitest';
import { solveEscapeChain, type ChainTransition } from '../../../src/lib/noise/markov-chain';

const t = (from: number, to: number, rate: number, crossings: number[][] = []): ChainTransition => ({ from, to, logRate: Math.log(rate), crossings });

describe('solveEscapeChain(chain)', () => {
  // Hand-built 3-state chain, nodes n0 and n1, start 0:
  //   0 -> 1 at rate a (n0 escapes), 1 -> 0 at rate b (return), 1 -> 2 at rate c (n1 escapes),
  //   0 -> 2 at rate d (n1 then n0 escape along the transition).
  // Closed forms (first-step analysis, derived here):
  //   P([n0, n1]) = a / (a + d), P([n1, n0]) = d / (a + d)   (from 0 the first jump decides the first node;
  //     after n0 escaped, every way to state 2 escapes n1 last),
  //   E[T_1] = 1 / (a + d),
  //   after entering state 1 with n0 escaped: h1 = 1/(b+c) + b/(b+c) h0, h0 = 1/(a+d) + a/(a+d) h1
  //     =>  h1 = (a + d + b) / ((b + c)(a + d) - a b),
  //   E[T_2] = 1 / (a + d) + a / (a + d) h1,
  //   P(return) = a / (a + d) * b / (b + c)   (from state 1 the race b vs c, before completion).
  const [a, b, c, d] = [2, 3, 0.5, 0.7];
  const chain = { states: 3, nodes: 2, start: 0, transitions: [t(0, 1, a, [[0]]), t(1, 0, b), t(1, 2, c, [[1]]), t(0, 2, d, [[1], [0]])] };

  it('gives the closed-form order probabilities of a hand-built 3-state chain', () => {
    const r = solveEscapeChain(chain);
    const p = Object.fromEntries(r.sequences.map((s) => [s.order.join(','), s.probability]));
    expect(p['0,1']).toBeCloseTo(a / (a + d), 14);
    expect(p['1,0']).toBeCloseTo(d / (a + d), 14);
    expect(r.incomplete).toBeCloseTo(0, 14);
    expect(r.complete).toBe(true);
  });

  it('gives the closed-form mean first and last escape times and the return probability', () => {
    const r = solveEscapeChain(chain);
    const h1 = (a + d + b) / ((b + c) * (a + d) - a * b);
    expect(r.meanKthEscape[0]).toBeCloseTo(1 / (a + d), 13);
    expect(r.meanKthEscape[1]).toBeCloseTo(1 / (a + d) + (a / (a + d)) * h1, 13);
    expect(r.returnProbability).toBeCloseTo((a / (a + d)) * (b / (b + c)), 14);
    expect(r.reachProbability).toEqual([expect.closeTo(1, 14), expect.closeTo(1, 14)]);
  });

  it('splits a tie between nodes crossing together equally', () => {
    // One synchronous transition escaping both nodes together: each order 1/2 by definition of a tie.
    const r = solveEscapeChain({ states: 2, nodes: 2, start: 0, transitions: [t(0, 1, 1.5, [[0, 1]]), t(1, 0, 0.2)] });
    expect(r.sequences.map((s) => s.probability)).toEqual([0.5, 0.5]);
    expect(r.meanKthEscape).toEqual([expect.closeTo(1 / 1.5, 14), expect.closeTo(1 / 1.5, 14)]);
    expect(r.returnProbability).toBe(0);
  });

  it('reports mass trapped in a state without further escapes and infinite later times', () => {
    // 0 -> 1 (n0) at rate 1, 0 -> 2 (n0) at rate 3; state 2 has no way out, state 1 goes on to 3 (n1).
    // P(trapped) = 3/4, E[T_1] = 1/4; T_2 is infinite with probability 3/4.
    const r = solveEscapeChain({ states: 4, nodes: 2, start: 0, transitions: [t(0, 1, 1, [[0]]), t(0, 2, 3, [[0]]), t(1, 3, 1, [[1]])] });
    expect(r.incomplete).toBeCloseTo(0.75, 14);
    expect(r.meanKthEscape[0]).toBeCloseTo(0.25, 14);
    expect(r.meanKthEscape[1]).toBe(Infinity);
    expect(r.reachProbability[1]).toBeCloseTo(0.25, 14);
    expect(r.diagnostics.map((x) => x.code)).toContain('prediction-incomplete');
  });

  it('keeps weak-noise rates that underflow exp() through their logs', () => {
    // Rates e^-800 and 3 e^-800: exp underflows to 0, the ratio 1/4 : 3/4 must survive; E[T_1] = e^800 / 4 overflows.
    const r = solveEscapeChain({ states: 3, nodes: 2, start: 0, transitions: [
      { from: 0, to: 1, logRate: -800, crossings: [[0], [1]] }, { from: 0, to: 2, logRate: -800 + Math.log(3), crossings: [[1], [0]] }] });
    expect(r.sequences).toEqual([{ order: [1, 0], probability: expect.closeTo(0.75, 12) }, { order: [0, 1], probability: expect.closeTo(0.25, 12) }]);
    expect(r.meanKthEscape[0]).toBe(Infinity);
    expect(r.incomplete).toBe(0);
    expect(r.diagnostics.map((x) => x.code)).toContain('prediction-time-overflow');
  });

  it('stops at the cap on augmented states with a diagnostic', () => {
    const r = solveEscapeChain(chain, { maxAugmentedStates: 3 });
    expect(r.complete).toBe(false);
    expect(r.incomplete).toBeGreaterThan(0);
    expect(r.diagnostics.map((x) => x.code)).toContain('prediction-chain-cap');
  });

  it('stops when cancelled and says so', () => {
    const r = solveEscapeChain(chain, { signal: { aborted: true } });
    expect(r.complete).toBe(false);
    expect(r.incomplete).toBe(1);
    expect(r.diagnostics.map((x) => x.code)).toEqual(['prediction-cancelled']);
  });

  it('rejects bad indices naming the field', () => {
    expect(() => solveEscapeChain({ ...chain, start: 5 })).toThrow(/start/);
    expect(() => solveEscapeChain({ ...chain, transitions: [t(0, 7, 1)] })).toThrow(/transitions\[0\]/);
    expect(() => solveEscapeChain({ ...chain, nodes: 31 })).toThrow(/nodes/);
    expect(() => solveEscapeChain(chain, { maxAugmentedStates: 0 })).toThrow(/maxAugmentedStates/);
  });
});
