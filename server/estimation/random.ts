/**
 * Seeded pseudo-random numbers for Monte Carlo: xoshiro128** (Blackman & Vigna) seeded through
 * splitmix32, uniforms with 53 random bits, and standard normals by the ziggurat method.
 * Deterministic for a given seed on every platform (32-bit integer arithmetic only).
 */
export class SeededRandom {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;

  constructor(seed: number) {
    let x = seed >>> 0;
    const next = (): number => {
      // splitmix32
      x = (x + 0x9e3779b9) | 0;
      let z = x;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
      return (z ^ (z >>> 16)) >>> 0;
    };
    this.s0 = next();
    this.s1 = next();
    this.s2 = next();
    this.s3 = next();
    if ((this.s0 | this.s1 | this.s2 | this.s3) === 0) this.s0 = 1;
  }

  /** Next 32-bit unsigned integer. */
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

  /**
   * Fill an array with standard normals: the same ziggurat as normal(), with the generator state
   * held in local variables for the bulk case (the Monte Carlo inner loop).
   */
  fillNormals(out: Float64Array): void {
    let s0 = this.s0;
    let s1 = this.s1;
    let s2 = this.s2;
    let s3 = this.s3;
    const N = out.length;
    for (let i = 0; i < N; i++) {
      const u = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0;
      const t = s1 << 9;
      s2 ^= s0;
      s3 ^= s1;
      s1 ^= s2;
      s0 ^= s3;
      s2 ^= t;
      s3 = (s3 << 11) | (s3 >>> 21);
      const iz = u & 127;
      const hz = (u & ~127) | 0;
      if (Math.abs(hz) < KN[iz]!) {
        out[i] = hz * WN[iz]!;
        continue;
      }
      // rare slow path (about 1.2%): hand the state back and use the scalar method
      this.s0 = s0;
      this.s1 = s1;
      this.s2 = s2;
      this.s3 = s3;
      out[i] = this.slowNormal(hz, iz);
      s0 = this.s0;
      s1 = this.s1;
      s2 = this.s2;
      s3 = this.s3;
    }
    this.s0 = s0;
    this.s1 = s1;
    this.s2 = s2;
    this.s3 = s3;
  }

  /** Uniform on [0, 1) with 53 random bits. */
  uniform(): number {
    const hi = this.nextUint32() >>> 5; // 27 bits
    const lo = this.nextUint32() >>> 6; // 26 bits
    return (hi * 67108864 + lo) / 9007199254740992;
  }

  /**
   * Standard normal deviate by the ziggurat method (Marsaglia & Tsang 2000, J. Statistical
   * Software 5(8), 128 layers). The layer comes from the low 7 bits of a 32-bit draw and the
   * value from the other 25, so the two are independent.
   */
  normal(): number {
    const u = this.nextUint32();
    const iz = u & 127;
    const hz = (u & ~127) | 0;
    if (Math.abs(hz) < KN[iz]!) return hz * WN[iz]!;
    return this.slowNormal(hz, iz);
  }

  /** The ziggurat's wedge and tail cases for a first draw (hz, iz) that missed the rectangle. */
  private slowNormal(hz0: number, iz0: number): number {
    let hz = hz0;
    let iz = iz0;
    for (;;) {
      const x = hz * WN[iz]!;
      if (iz === 0) {
        // tail beyond R
        let xt: number;
        let yt: number;
        do {
          xt = -Math.log(this.uniform() || 1e-300) / ZIG_R;
          yt = -Math.log(this.uniform() || 1e-300);
        } while (yt + yt < xt * xt);
        return hz > 0 ? ZIG_R + xt : -ZIG_R - xt;
      }
      if (FN[iz]! + this.uniform() * (FN[iz - 1]! - FN[iz]!) < Math.exp(-0.5 * x * x)) return x;
      const u = this.nextUint32();
      iz = u & 127;
      hz = (u & ~127) | 0;
      if (Math.abs(hz) < KN[iz]!) return hz * WN[iz]!;
    }
  }
}

const ZIG_R = 3.442619855899;
const KN = new Float64Array(128);
const WN = new Float64Array(128);
const FN = new Float64Array(128);
(() => {
  const m1 = 2147483648;
  const vn = 9.91256303526217e-3;
  let dn = ZIG_R;
  let tn = dn;
  const q = vn / Math.exp(-0.5 * dn * dn);
  KN[0] = (dn / q) * m1;
  KN[1] = 0;
  WN[0] = q / m1;
  WN[127] = dn / m1;
  FN[0] = 1;
  FN[127] = Math.exp(-0.5 * dn * dn);
  for (let i = 126; i >= 1; i--) {
    dn = Math.sqrt(-2 * Math.log(vn / dn + Math.exp(-0.5 * dn * dn)));
    KN[i + 1] = (dn / tn) * m1;
    tn = dn;
    FN[i] = Math.exp(-0.5 * dn * dn);
    WN[i] = dn / m1;
  }
})();

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}
