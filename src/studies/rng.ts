/**
 * Deterministic random numbers for Monte Carlo studies.
 *
 * Each case k of a study draws from its own stream, seeded from (seed, k) alone, so a case
 * draws the same numbers whichever shard, worker or order runs it: a sharded study and a
 * single run agree to the bit. The generator is xoshiro128** (32-bit words, so JavaScript
 * needs no BigInt); its 128-bit state is filled by hashing (seed, k, word index) with the
 * MurmurHash3 32-bit finaliser. For a fixed seed the first state word is a bijection of k, so
 * two cases of one study (k < 2³²) never start from the same state.
 *
 * References: D. Blackman & S. Vigna, "Scrambled linear pseudorandom number generators",
 * ACM Trans. Math. Softw. 47(4), 2021, art. 36 (xoshiro128**, and 53-bit doubles from two
 * outputs); A. Appleby, MurmurHash3 (public domain), fmix32 finaliser; G. E. P. Box &
 * M. E. Muller, Ann. Math. Statist. 29 (1958) 610 (normal deviates).
 */

const GOLDEN = 0x9e3779b9;
/** 2^26 and 2^53, for doubles built from 27 + 26 random bits. */
const TWO26 = 67108864;
const TWO53 = 9007199254740992;
/** Outputs skipped after seeding, so that the hashed state is well stirred first. */
const WARM_UP = 8;

/** MurmurHash3's 32-bit finaliser: a bijection of 32-bit words with full avalanche. */
export function fmix32(h: number): number {
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}

/** xoshiro128**: a 32-bit generator with period 2^128 − 1. */
export class Xoshiro128 {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;

  /** From four 32-bit words (not all zero; an all-zero state is replaced by [1, 0, 0, 0]). */
  constructor(state: readonly [number, number, number, number]) {
    [this.s0, this.s1, this.s2, this.s3] = state.map((w) => w >>> 0);
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s0 = 1;
  }

  /** The next 32-bit output as an unsigned integer. */
  nextU32(): number {
    const result = Math.imul(rotl(Math.imul(this.s1, 5) >>> 0, 7), 9) >>> 0;
    const t = (this.s1 << 9) >>> 0;
    this.s2 = (this.s2 ^ this.s0) >>> 0;
    this.s3 = (this.s3 ^ this.s1) >>> 0;
    this.s1 = (this.s1 ^ this.s2) >>> 0;
    this.s0 = (this.s0 ^ this.s3) >>> 0;
    this.s2 = (this.s2 ^ t) >>> 0;
    this.s3 = rotl(this.s3, 11);
    return result;
  }

  /** A double uniform on the open interval (0, 1), from 53 random bits (never 0, never 1). */
  uniform(): number {
    const a = this.nextU32() >>> 5; // 27 bits
    const b = this.nextU32() >>> 6; // 26 bits
    return (a * TWO26 + b + 0.5) / TWO53;
  }

  /** A standard normal deviate by the Box–Muller transform (always consumes two uniforms). */
  normal(): number {
    const u1 = this.uniform();
    const u2 = this.uniform();
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  }
}

/** Largest seed accepted: any integer a double holds exactly. */
export const MAX_SEED = Number.MAX_SAFE_INTEGER;

/**
 * The generator for case k of a study with this seed. seed: integer 0..2^53−1; k: integer
 * 0..2^32−1. Throws (a programmer error) outside those ranges.
 */
export function caseStream(seed: number, k: number): Xoshiro128 {
  if (!Number.isSafeInteger(seed) || seed < 0) throw new RangeError(`caseStream: seed must be an integer 0..2^53-1, got ${seed}`);
  if (!Number.isInteger(k) || k < 0 || k > 0xffffffff) throw new RangeError(`caseStream: case index must be an integer 0..2^32-1, got ${k}`);
  const lo = seed >>> 0;
  const hi = Math.floor(seed / 4294967296) >>> 0;
  const words: number[] = [];
  for (let i = 0; i < 4; i++) {
    // fmix32 is a bijection, and x ^ k is one in k: for fixed seed and i, k ↦ word is injective.
    const a = fmix32((lo + Math.imul(i + 1, GOLDEN)) >>> 0);
    const b = fmix32((a ^ hi) >>> 0);
    words.push(fmix32((b ^ k) >>> 0));
  }
  const g = new Xoshiro128(words as [number, number, number, number]);
  for (let i = 0; i < WARM_UP; i++) g.nextU32();
  return g;
}
