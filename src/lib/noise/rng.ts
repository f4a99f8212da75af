/**
 * Seeded normal streams of the Monte Carlo, one per path. Path i of a run with seed K draws from
 * the improved ziggurat (Doornik 2005, "An improved ziggurat method to generate normal random
 * samples"; package @stdlib/random-base-improved-ziggurat) over a Mersenne Twister MT19937
 * (Matsumoto & Nishimura 1998, ACM TOMACS 8; @stdlib/random-base-mt19937) initialised by the
 * reference `init_by_array` with the key [K, i]. The stream depends only on (K, i), never on which
 * thread simulates the path, so results are bit-identical for any number of threads.
 *
 * Speed: creating a generator per path through the package's factory costs about 60 µs (option
 * checks, property definitions, allocation). `PathStreams` instead keeps ONE ziggurat generator per
 * thread, created on a state array it shares with the package (the documented `state` option with
 * `copy: false`, @stdlib PRNG state API), and re-seeds it per path in place: the MT19937 words are filled by `init_by_array([K, i])` exactly as in the reference code
 * (mt19937ar.c, Matsumoto & Nishimura 2002; the same steps as the package's own seeding) into the
 * package's state layout, and the state index is the one the package sets after seeding. The
 * stream of (K, i) is therefore the same as `pathNormals(K, i)` word for word
 * (tests/lib/noise/rng.test.ts checks it against the package's factory for many (K, i)).
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
 * One package factory call per stream (about 60 µs); PathStreams gives the same streams cheaply.
 */
export function pathNormals(seed: number, index: number): NormalStream {
  checkSeed(seed);
  checkSeed(index, 'path index');
  return improvedZiggurat.factory({ seed: [seed, index], copy: false }) as NormalStream;
}

// MT19937 constants (Matsumoto & Nishimura 1998; mt19937ar.c).
const N = 624;
/** Layout of the @stdlib MT19937 state array: | version | sections | N | ...mt | 1 | index | seedLength | ...seed |. */
const MT_OFFSET = 3;
const SEED_LENGTH_OFFSET = N + 5;
/** Position of the state index (the "other" section, after its length word). */
const INDEX_OFFSET = N + 4;

type StatefulNormal = NormalStream & { state: Uint32Array };

/**
 * The reference `init_by_array(key)` of mt19937ar.c (Matsumoto & Nishimura 2002) into
 * mt[0..N-1] = state[offset .. offset + N - 1]. Worked on an Int32Array view of the same words:
 * the arithmetic is modulo 2^32 either way (Math.imul, ^, >>> and | 0 give the same low 32 bits as
 * the C code's unsigned arithmetic), and signed 32-bit values stay small integers for the engine,
 * where unsigned ones above 2^31 become heap numbers (about 3x slower here).
 */
function initByArray(words: Uint32Array, offset: number, key0: number, key1: number): void {
  const mt = new Int32Array(words.buffer, words.byteOffset + offset * 4, N);
  mt[0] = 19650218;
  for (let i = 1; i < N; i++) {
    const s = mt[i - 1] ^ (mt[i - 1] >>> 30);
    mt[i] = (Math.imul(s, 1812433253) + i) | 0;
  }
  const k0 = key0 | 0;
  const k1 = key1 | 0;
  let i = 1;
  let j = 0;
  for (let k = N; k > 0; k--) {
    const s = mt[i - 1] ^ (mt[i - 1] >>> 30);
    mt[i] = ((mt[i] ^ Math.imul(s, 1664525)) + (j === 0 ? k0 : k1) + j) | 0;
    i++;
    j++;
    if (i >= N) {
      mt[0] = mt[N - 1];
      i = 1;
    }
    if (j >= 2) j = 0;
  }
  for (let k = N - 1; k > 0; k--) {
    const s = mt[i - 1] ^ (mt[i - 1] >>> 30);
    mt[i] = ((mt[i] ^ Math.imul(s, 1566083941)) - i) | 0;
    i++;
    if (i >= N) {
      mt[0] = mt[N - 1];
      i = 1;
    }
  }
  mt[0] = 0x80000000 | 0;
}

/** The thread's one generator on its shared state array, made on first use. */
let shared: { normal: StatefulNormal; template: Uint32Array; startIndex: number } | null = null;

function threadGenerator(): { normal: StatefulNormal; template: Uint32Array; startIndex: number } {
  if (!shared) {
    // The package's own state for key [0, 0] gives the layout and the post-seeding state index
    // (mt19937ar.c's mti = N whatever the key).
    const layout = new Uint32Array((improvedZiggurat.factory({ seed: [0, 0], copy: false }) as StatefulNormal).state);
    if (layout[MT_OFFSET - 1] !== N || layout[SEED_LENGTH_OFFSET] !== 2) throw new Error('PathStreams: unexpected @stdlib MT19937 state layout');
    // `state` with `copy: false`: the generator works on this very array (the package's documented
    // shared-state option), so select() re-seeds it in place.
    shared = { normal: improvedZiggurat.factory({ state: layout, copy: false }) as StatefulNormal, template: layout, startIndex: layout[INDEX_OFFSET] };
  }
  return shared;
}

/**
 * The streams of one run (one seed) in one thread: `select(i)` re-seeds the thread's single
 * ziggurat generator to the stream of (seed, i) and returns it. There is ONE generator per thread
 * (module state), shared by every PathStreams: a later select() on any of them re-seeds the stream
 * returned before. Same numbers as pathNormals(seed, i); about 6 µs per select instead of about
 * 60 µs. One generator also keeps the Monte Carlo's call site `z()` monomorphic: a new generator
 * per run made the path loop about 1.4 times slower from the second run on (measured; V8 inlines a
 * call only while it sees one closure).
 */
export class PathStreams {
  private readonly normal: StatefulNormal;
  private readonly template: Uint32Array;
  private readonly startIndex: number;

  constructor(readonly seed: number) {
    checkSeed(seed);
    const g = threadGenerator();
    this.normal = g.normal;
    this.template = g.template;
    this.startIndex = g.startIndex;
  }

  /** The normal stream of path `index` (an integer in [0, 2^32 - 1]). */
  select(index: number): NormalStream {
    checkSeed(index, 'path index');
    const s = this.template;
    initByArray(s, MT_OFFSET, this.seed, index);
    s[INDEX_OFFSET] = this.startIndex;
    s[SEED_LENGTH_OFFSET + 1] = this.seed;
    s[SEED_LENGTH_OFFSET + 2] = index;
    return this.normal;
  }
}
