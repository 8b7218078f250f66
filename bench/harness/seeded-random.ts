// SplitMix64 (Steele, Lea & Flood, "Fast splittable pseudorandom number generators", OOPSLA 2014;
// the constants are those of Vigna's public-domain splitmix64.c), carried in two uint32 halves so
// the hot loop stays in Smi/double arithmetic instead of BigInt (about 30× faster here, and the
// generator draws ~5 numbers per row at n = 10⁶). Every draw is exact integer arithmetic, so the
// stream is bit-identical on every platform; uniforms use the top 53 bits (no rounding bias).

const GAMMA_HI = 0x9e3779b9;
const GAMMA_LO = 0x7f4a7c15;
const MIX1_HI = 0xbf58476d;
const MIX1_LO = 0x1ce4e5b9;
const MIX2_HI = 0x94d049bb;
const MIX2_LO = 0x133111eb;
const TWO_POW_MINUS_53 = 2 ** -53;
const TWO_POW_21 = 2 ** 21;

/** Low and high halves of the full 64-bit product of two uint32 (schoolbook on 16-bit limbs). */
function mulWide(a: number, b: number, out: Uint32Array): void {
  const a0 = a & 0xffff;
  const a1 = a >>> 16;
  const b0 = b & 0xffff;
  const b1 = b >>> 16;
  const p00 = a0 * b0;
  const p01 = a0 * b1;
  const p10 = a1 * b0;
  const p11 = a1 * b1;
  const mid = (p00 >>> 16) + (p01 & 0xffff) + (p10 & 0xffff);
  out[0] = (((mid & 0xffff) << 16) | (p00 & 0xffff)) >>> 0;
  out[1] = (p11 + (p01 >>> 16) + (p10 >>> 16) + (mid >>> 16)) >>> 0;
}

export class SplitMix64 {
  private hi: number;
  private lo: number;
  private readonly wide = new Uint32Array(2);
  private spareNormal = Number.NaN;

  /** The 64-bit state is (seedHi·2³² + seedLo); both halves are taken mod 2³². */
  constructor(seedHi: number, seedLo = 0) {
    this.hi = seedHi >>> 0;
    this.lo = seedLo >>> 0;
  }

  /** Next 64-bit output as [hi, lo] in `out` (the published algorithm, step for step). */
  nextPair(out: Uint32Array): void {
    // state += golden gamma (with carry)
    const lo = (this.lo + GAMMA_LO) >>> 0;
    this.hi = (this.hi + GAMMA_HI + (lo < this.lo ? 1 : 0)) >>> 0;
    this.lo = lo;
    let zh = this.hi;
    let zl = this.lo;
    // z = (z ^ (z >>> 30)) * MIX1
    zl = (zl ^ ((zl >>> 30) | (zh << 2))) >>> 0;
    zh = (zh ^ (zh >>> 30)) >>> 0;
    [zh, zl] = this.mul64(zh, zl, MIX1_HI, MIX1_LO);
    // z = (z ^ (z >>> 27)) * MIX2
    zl = (zl ^ ((zl >>> 27) | (zh << 5))) >>> 0;
    zh = (zh ^ (zh >>> 27)) >>> 0;
    [zh, zl] = this.mul64(zh, zl, MIX2_HI, MIX2_LO);
    // z ^ (z >>> 31)
    out[1] = (zl ^ ((zl >>> 31) | (zh << 1))) >>> 0;
    out[0] = (zh ^ (zh >>> 31)) >>> 0;
  }

  /** Uniform on [0, 1) with 53 random bits: (z >>> 11)·2⁻⁵³. */
  uniform(): number {
    this.nextPair(this.wide);
    return (this.wide[0] * TWO_POW_21 + (this.wide[1] >>> 11)) * TWO_POW_MINUS_53;
  }

  /** Uniform integer in [0, m) for m ≤ 2³² (multiply-shift on 53 bits; bias < m/2⁵³, negligible here). */
  below(m: number): number {
    return Math.floor(this.uniform() * m);
  }

  /** Standard normal by Box–Muller (both variates used in turn; u₁ in (0, 1] so the log is finite). */
  normal(): number {
    if (!Number.isNaN(this.spareNormal)) {
      const z = this.spareNormal;
      this.spareNormal = Number.NaN;
      return z;
    }
    const u1 = 1 - this.uniform();
    const u2 = this.uniform();
    const r = Math.sqrt(-2 * Math.log(u1));
    this.spareNormal = r * Math.sin(2 * Math.PI * u2);
    return r * Math.cos(2 * Math.PI * u2);
  }

  /** (ah·2³²+al)·(bh·2³²+bl) mod 2⁶⁴ as [hi, lo]. */
  private mul64(ah: number, al: number, bh: number, bl: number): [number, number] {
    mulWide(al, bl, this.wide);
    const lo = this.wide[0];
    const hi = (this.wide[1] + Math.imul(ah, bl) + Math.imul(al, bh)) >>> 0;
    return [hi, lo];
  }
}
