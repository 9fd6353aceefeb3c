/**
 * Seeded pseudo-random numbers for reproducible Monte Carlo runs:
 * xoshiro128** 1.1 (Blackman & Vigna, "Scrambled linear pseudorandom number
 * generators", 2018), its 128-bit state filled by splitmix32 from the seed.
 */
export class SeededRandom {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;
  private spareGaussian: number | undefined;

  constructor(seed: number) {
    let state = seed >>> 0;
    const splitmix32 = (): number => {
      state = (state + 0x9e3779b9) | 0;
      let z = state;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b);
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35);
      return (z ^ (z >>> 16)) >>> 0;
    };
    this.s0 = splitmix32();
    this.s1 = splitmix32();
    this.s2 = splitmix32();
    this.s3 = splitmix32();
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

  /** Uniform in [0, 1) with 53 random bits. */
  nextUniform(): number {
    const high = this.nextUint32() >>> 5;
    const low = this.nextUint32() >>> 6;
    return (high * 67108864 + low) / 9007199254740992;
  }

  /** Standard normal deviate (Marsaglia polar method). */
  nextGaussian(): number {
    if (this.spareGaussian !== undefined) {
      const spare = this.spareGaussian;
      this.spareGaussian = undefined;
      return spare;
    }
    let u: number;
    let v: number;
    let s: number;
    do {
      u = 2 * this.nextUniform() - 1;
      v = 2 * this.nextUniform() - 1;
      s = u * u + v * v;
    } while (s >= 1 || s === 0);
    const factor = Math.sqrt((-2 * Math.log(s)) / s);
    this.spareGaussian = v * factor;
    return u * factor;
  }
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}
