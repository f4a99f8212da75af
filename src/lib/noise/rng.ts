/**
 * Seeded normal streams of the Monte Carlo, one per path. Path i of a run with seed K draws from
 * the improved ziggurat (Doornik 2005, "An improved ziggurat method to generate normal random
 * samples"; package @stdlib/random-base-improved-ziggurat) over a Mersenne Twister MT19937
 * (Matsumoto & Nishimura 1998, ACM TOMACS 8; @stdlib/random-base-mt19937) initialised by the
 * reference `init_by_array` with the key [K, i]. The stream depends only on (K, i), never on which
 * thread simulates the path, so results are bit-identical for any number of threads.
 */
import improvedZiggurat from '@stdlib/random-base-improved-ziggurat';
import { NoiseSettingError } from './noise-spec';

/** A source of standard normal variates. */
export type NormalStream = () => number;

const UINT32_MAX = 4294967295;

/** Checks a run seed: an integer in [0, 2^32 - 1] (MT19937 keys are 32-bit words). */
export function checkSeed(seed: number, field = 'seed'): number {
  if (!Number.isInteger(seed) || seed < 0 || seed > UINT32_MAX) throw new NoiseSettingError(field, `must be an integer in [0, ${UINT32_MAX}], got ${seed}`);
  return seed;
}

/**
 * The normal stream of path `index` of a run seeded with `seed`: improved ziggurat over
 * MT19937 init_by_array([seed, index]) (see the file header). Both must be integers in [0, 2^32 - 1].
 */
export function pathNormals(seed: number, index: number): NormalStream {
  checkSeed(seed);
  checkSeed(index, 'path index');
  return improvedZiggurat.factory({ seed: [seed, index], copy: false }) as NormalStream;
}
