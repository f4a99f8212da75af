import { describe, expect, it } from 'vitest';
import { PathStreams, pathNormals } from '../../../src/lib/noise/rng';

describe('PathStreams', () => {
  // Reference: the package's own factory (@stdlib/random-base-improved-ziggurat over MT19937 seeded by
  // init_by_array([seed, i])), i.e. pathNormals. Re-seeding one generator must give the same words.
  it('gives the same normals as a fresh package generator for every (seed, i), in any select order', () => {
    for (const seed of [0, 1, 11, 4294967295]) {
      const streams = new PathStreams(seed);
      for (const i of [0, 1, 2, 7, 1000, 123456789, 3, 0, 4294967295]) {
        const a = streams.select(i);
        const b = pathNormals(seed, i);
        // 1500 normals draw more than 624 words, so the twist after seeding is covered too.
        for (let k = 0; k < 1500; k++) expect(a()).toBe(b());
      }
    }
  });

  it('shares one generator per thread: each select gives its own stream, whichever instance selected before', () => {
    const a = new PathStreams(5);
    const b = new PathStreams(6);
    for (const [streams, seed, i] of [[a, 5, 3], [b, 6, 3], [a, 5, 4], [b, 6, 0]] as const) {
      const got = streams.select(i);
      const want = pathNormals(seed, i);
      for (let k = 0; k < 700; k++) expect(got()).toBe(want());
    }
  });

  it('rejects a bad path index naming it', () => {
    expect(() => new PathStreams(1).select(-1)).toThrow(/path index/);
    expect(() => new PathStreams(1.5)).toThrow(/seed/);
  });
});
