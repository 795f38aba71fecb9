/**
 * A seeded pseudo-random generator, so that one seed gives one sample in a notebook cell, a
 * widget's worker and a cluster shard alike: xoshiro128** (Blackman & Vigna, "Scrambled linear
 * pseudorandom number generators", ACM TOMS 47, 36 (2021)), 32-bit integer arithmetic only, its
 * 128-bit state filled from the seed by splitmix64 (Steele, Lea & Flood, OOPSLA 2014), as the
 * xoshiro authors recommend. Doubles take 53 random bits from two outputs.
 */
import { ModelError, valueText } from '../model/errors.js';

/** A seed must be a nonnegative safe integer (it travels in JSON requests and plans). */
export function checkSeed(seed: unknown, field = 'seed'): number {
  if (typeof seed !== 'number' || !Number.isSafeInteger(seed) || seed < 0) {
    throw new ModelError(field, `expected a nonnegative integer (at most 2^53 - 1). Value: ${valueText(seed)}`);
  }
  return seed;
}

const MASK64 = (1n << 64n) - 1n;

/** splitmix64: the 64-bit outputs that seed the state, from the 64-bit counter `seed`. */
function splitmix64(seed: bigint, count: number): bigint[] {
  let x = seed & MASK64;
  const out: bigint[] = [];
  for (let i = 0; i < count; i++) {
    x = (x + 0x9e3779b97f4a7c15n) & MASK64;
    let z = x;
    z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
    z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
    out.push(z ^ (z >> 31n));
  }
  return out;
}

export class SeededRandom {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;

  /**
   * `stream` picks one of 256 independent streams of one seed (0: samples, 1: the Chebyshev path's
   * random probe vectors): splitmix64 starts from seed + stream * 2^56.
   */
  constructor(seed: number, stream = 0) {
    checkSeed(seed);
    const [a, b] = splitmix64(BigInt(seed) + (BigInt(stream) << 56n), 2);
    this.s0 = Number(a & 0xffffffffn) | 0;
    this.s1 = Number(a >> 32n) | 0;
    this.s2 = Number(b & 0xffffffffn) | 0;
    this.s3 = Number(b >> 32n) | 0;
    // splitmix64 never gives an all-zero pair of outputs in practice, but the state must not be zero.
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s0 = 1;
  }

  /** The next 32-bit output, as an unsigned integer. */
  nextUint32(): number {
    const result = Math.imul(rotl(Math.imul(this.s1, 5), 7), 9) >>> 0;
    const t = this.s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return result;
  }

  /** Uniform in [0, 1) with 53 random bits. */
  next(): number {
    const hi = this.nextUint32() >>> 5; // 27 bits
    const lo = this.nextUint32() >>> 6; // 26 bits
    return (hi * 67108864 + lo) / 9007199254740992;
  }

  /** Uniform in [-width/2, width/2). */
  centred(width: number): number {
    return (this.next() - 0.5) * width;
  }
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}
