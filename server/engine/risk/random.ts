/**
 * Seeded, reproducible random numbers for Monte Carlo sampling.
 *
 * Generator: xoshiro256** 1.0 (D. Blackman & S. Vigna, "Scrambled linear pseudorandom number generators",
 * ACM Trans. Math. Softw. 47(4), 2021; reference C code at prng.di.unimi.it), seeded through SplitMix64
 * (G. Steele, D. Lea & C. Flood, "Fast splittable pseudorandom number generators", OOPSLA 2014; the seeding the
 * xoshiro authors recommend). 64-bit arithmetic is done on pairs of 32-bit halves (JS has no fast uint64).
 *
 * Streams per clone: clone k's generator state is the first four SplitMix64 outputs started from
 *   mix64(mix64(seed) + GAMMA * (k + 1))   (mod 2^64, GAMMA = 0x9e3779b97f4a7c15, mix64 = SplitMix64's finaliser),
 * so clone k's deviates depend only on (seed, k), never on which worker draws them or in what order. mix64 is a
 * bijection and GAMMA is odd, so distinct k give distinct starting states; the outer mix64 scatters them over the
 * 2^256 state space (overlap of two streams of length L has probability ~ L * nClones^2 / 2^256: nil).
 *
 * Normal deviates: Box-Muller (Box & Muller 1958, Ann. Math. Stat. 29, 610), both values of each pair used.
 */

const TWO32 = 4294967296;

/** 64-bit unsigned integer as two 32-bit halves. */
export type U64 = { hi: number; lo: number };

function add64(ah: number, al: number, bh: number, bl: number, out: U64): void {
  const lo = al + bl;
  out.lo = lo >>> 0;
  out.hi = (ah + bh + (lo >= TWO32 ? 1 : 0)) >>> 0;
}

/** Low 64 bits of a 64 x 64-bit product. */
function mul64(ah: number, al: number, bh: number, bl: number, out: U64): void {
  const a0 = al & 0xffff;
  const a1 = al >>> 16;
  const b0 = bl & 0xffff;
  const b1 = bl >>> 16;
  const mid = a0 * b1 + a1 * b0; // < 2^33, exact
  const lowSum = a0 * b0 + (mid % 65536) * 65536; // < 2^33
  const carry = Math.floor(lowSum / TWO32);
  const hiPart = a1 * b1 + Math.floor(mid / 65536) + carry; // < 2^33
  out.lo = lowSum % TWO32;
  out.hi = ((hiPart % TWO32) + (Math.imul(ah, bl) >>> 0) + (Math.imul(al, bh) >>> 0)) % TWO32;
}

const GAMMA_HI = 0x9e3779b9;
const GAMMA_LO = 0x7f4a7c15;
const M1_HI = 0xbf58476d;
const M1_LO = 0x1ce4e5b9;
const M2_HI = 0x94d049bb;
const M2_LO = 0x133111eb;

/** SplitMix64 finaliser: z ^= z>>>30; z *= M1; z ^= z>>>27; z *= M2; z ^= z>>>31 (in place). */
function mix64(z: U64): void {
  // z ^= z >>> 30
  let lo = (z.lo ^ ((z.lo >>> 30) | (z.hi << 2))) >>> 0;
  let hi = (z.hi ^ (z.hi >>> 30)) >>> 0;
  mul64(hi, lo, M1_HI, M1_LO, z);
  // z ^= z >>> 27
  lo = (z.lo ^ ((z.lo >>> 27) | (z.hi << 5))) >>> 0;
  hi = (z.hi ^ (z.hi >>> 27)) >>> 0;
  mul64(hi, lo, M2_HI, M2_LO, z);
  // z ^= z >>> 31
  lo = (z.lo ^ ((z.lo >>> 31) | (z.hi << 1))) >>> 0;
  hi = (z.hi ^ (z.hi >>> 31)) >>> 0;
  z.hi = hi;
  z.lo = lo;
}

/** Convert a seed (non-negative safe integer or bigint; reduced mod 2^64) to halves. */
export function seedToU64(seed: number | bigint): U64 {
  let b: bigint;
  if (typeof seed === 'bigint') b = seed;
  else {
    if (!Number.isSafeInteger(seed)) throw new RangeError(`seed must be a safe integer or a bigint, got ${seed}`);
    b = BigInt(seed);
  }
  b = BigInt.asUintN(64, b);
  return { hi: Number(b >> 32n), lo: Number(b & 0xffffffffn) };
}

/** SplitMix64 generator (reference algorithm; used here for seeding). */
export class SplitMix64 {
  private hi: number;
  private lo: number;
  private readonly tmp: U64 = { hi: 0, lo: 0 };
  constructor(seed: number | bigint | U64) {
    const s = typeof seed === 'object' ? seed : seedToU64(seed);
    this.hi = s.hi >>> 0;
    this.lo = s.lo >>> 0;
  }
  /** Next output as halves (written into out). */
  nextInto(out: U64): void {
    add64(this.hi, this.lo, GAMMA_HI, GAMMA_LO, this.tmp);
    this.hi = this.tmp.hi;
    this.lo = this.tmp.lo;
    out.hi = this.hi;
    out.lo = this.lo;
    mix64(out);
  }
  /** Next output as a bigint (convenience, for tests and seeding). */
  nextBigInt(): bigint {
    const o = { hi: 0, lo: 0 };
    this.nextInto(o);
    return (BigInt(o.hi) << 32n) | BigInt(o.lo);
  }
}

/** xoshiro256** generator. State is eight 32-bit words: s0hi, s0lo, s1hi, s1lo, ... */
export class Xoshiro256StarStar {
  private readonly s = new Uint32Array(8);

  /** State from four SplitMix64 outputs of the given 64-bit seed (the authors' recommended seeding). */
  constructor(seed: number | bigint | U64) {
    const sm = new SplitMix64(seed);
    const o: U64 = { hi: 0, lo: 0 };
    for (let i = 0; i < 4; i++) {
      sm.nextInto(o);
      this.s[2 * i] = o.hi;
      this.s[2 * i + 1] = o.lo;
    }
  }

  /** Set the raw state (four 64-bit words); for tests against the reference algorithm. */
  static fromState(words: readonly bigint[]): Xoshiro256StarStar {
    const g = new Xoshiro256StarStar(0);
    for (let i = 0; i < 4; i++) {
      const w = BigInt.asUintN(64, words[i]);
      g.s[2 * i] = Number(w >> 32n);
      g.s[2 * i + 1] = Number(w & 0xffffffffn);
    }
    return g;
  }

  /** Advance and write the 64-bit output into out. */
  nextInto(out: U64): void {
    const s = this.s;
    const s0h = s[0], s0l = s[1], s1h = s[2], s1l = s[3], s2h = s[4], s2l = s[5], s3h = s[6], s3l = s[7];
    // result = rotl(s1 * 5, 7) * 9
    mul64(s1h, s1l, 0, 5, out);
    const rh = ((out.hi << 7) | (out.lo >>> 25)) >>> 0;
    const rl = ((out.lo << 7) | (out.hi >>> 25)) >>> 0;
    mul64(rh, rl, 0, 9, out);
    // t = s1 << 17
    const th = ((s1h << 17) | (s1l >>> 15)) >>> 0;
    const tl = (s1l << 17) >>> 0;
    const n2h = s2h ^ s0h, n2l = s2l ^ s0l; // s2 ^= s0
    const n3h = s3h ^ s1h, n3l = s3l ^ s1l; // s3 ^= s1
    const n1h = s1h ^ n2h, n1l = s1l ^ n2l; // s1 ^= s2
    const n0h = s0h ^ n3h, n0l = s0l ^ n3l; // s0 ^= s3
    const m2h = n2h ^ th, m2l = n2l ^ tl; // s2 ^= t
    // s3 = rotl(s3, 45) = swap halves, then rotl 13
    const x3h = n3l, x3l = n3h;
    s[0] = n0h;
    s[1] = n0l;
    s[2] = n1h;
    s[3] = n1l;
    s[4] = m2h;
    s[5] = m2l;
    s[6] = (x3h << 13) | (x3l >>> 19);
    s[7] = (x3l << 13) | (x3h >>> 19);
  }

  private readonly out: U64 = { hi: 0, lo: 0 };

  /** Next output as a bigint (tests). */
  nextBigInt(): bigint {
    this.nextInto(this.out);
    return (BigInt(this.out.hi) << 32n) | BigInt(this.out.lo);
  }

  /** Uniform double in [0, 1): the top 53 bits of the output times 2^-53 (the authors' recommended conversion). */
  nextDouble(): number {
    this.nextInto(this.out);
    return (this.out.hi * 2097152 + (this.out.lo >>> 11)) * 1.1102230246251565e-16;
  }
}

/** Uniform and standard-normal deviates from one xoshiro256** stream. */
export class RandomStream {
  private readonly gen: Xoshiro256StarStar;
  private spare = 0;
  private hasSpare = false;

  constructor(gen: Xoshiro256StarStar) {
    this.gen = gen;
  }

  /** The stream for clone `cloneIndex` of a run with the given seed (depends only on seed and index). */
  static forClone(seed: number | bigint, cloneIndex: number): RandomStream {
    return new RandomStream(new Xoshiro256StarStar(cloneStreamSeed(seed, cloneIndex)));
  }

  /** Uniform in [0, 1). */
  uniform(): number {
    return this.gen.nextDouble();
  }

  /** Standard normal deviate (Box-Muller; u1 in (0, 1] so the logarithm is finite). */
  normal(): number {
    if (this.hasSpare) {
      this.hasSpare = false;
      return this.spare;
    }
    const u1 = 1 - this.gen.nextDouble();
    const u2 = this.gen.nextDouble();
    const r = Math.sqrt(-2 * Math.log(u1));
    const a = 2 * Math.PI * u2;
    this.spare = r * Math.sin(a);
    this.hasSpare = true;
    return r * Math.cos(a);
  }

  /** Fill `out` with standard normal deviates. */
  normalsInto(out: Float64Array): void {
    for (let i = 0; i < out.length; i++) out[i] = this.normal();
  }
}

/** The 64-bit SplitMix64 seed for clone k: mix64(mix64(seed) + GAMMA (k+1)). */
export function cloneStreamSeed(seed: number | bigint, cloneIndex: number): U64 {
  if (!Number.isSafeInteger(cloneIndex) || cloneIndex < 0) {
    throw new RangeError(`clone index must be a non-negative safe integer, got ${cloneIndex}`);
  }
  const z = seedToU64(seed);
  mix64(z);
  // GAMMA * (k + 1) mod 2^64, with k+1 split into halves
  const k1 = cloneIndex + 1;
  const prod: U64 = { hi: 0, lo: 0 };
  mul64(GAMMA_HI, GAMMA_LO, Math.floor(k1 / TWO32) >>> 0, k1 >>> 0, prod);
  add64(z.hi, z.lo, prod.hi, prod.lo, z);
  mix64(z);
  return z;
}
