/**
 * Seeded generator with a state that can be saved and restored exactly (xoshiro128**,
 * Blackman and Vigna 2018, seeded through splitmix32). Normal deviates come from the
 * Box-Muller transform; the spare deviate is part of the saved state, so a restored
 * generator continues bit for bit.
 */
export interface RandomState {
  s: [number, number, number, number];
  spare: number | null;
}

export class Random {
  private s0 = 0;
  private s1 = 0;
  private s2 = 0;
  private s3 = 0;
  private spare: number | null = null;

  constructor(seed: number) {
    let z = seed >>> 0;
    const next = (): number => {
      z = (z + 0x9e3779b9) >>> 0;
      let t = z;
      t = Math.imul(t ^ (t >>> 16), 0x85ebca6b) >>> 0;
      t = Math.imul(t ^ (t >>> 13), 0xc2b2ae35) >>> 0;
      return (t ^ (t >>> 16)) >>> 0;
    };
    this.s0 = next();
    this.s1 = next();
    this.s2 = next();
    this.s3 = next();
  }

  /** Next unsigned 32-bit integer. */
  nextUint32(): number {
    const result = Math.imul(rotl(Math.imul(this.s1, 5) >>> 0, 7), 9) >>> 0;
    const t = (this.s1 << 9) >>> 0;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    this.s0 >>>= 0;
    this.s1 >>>= 0;
    this.s2 >>>= 0;
    return result;
  }

  /** Uniform on (0, 1): never exactly 0, so logarithms stay finite. */
  uniform(): number {
    return (this.nextUint32() + 0.5) / 4294967296;
  }

  /** Standard normal deviate. */
  normal(): number {
    if (this.spare !== null) {
      const value = this.spare;
      this.spare = null;
      return value;
    }
    const radius = Math.sqrt(-2 * Math.log(this.uniform()));
    const angle = 2 * Math.PI * this.uniform();
    this.spare = radius * Math.sin(angle);
    return radius * Math.cos(angle);
  }

  getState(): RandomState {
    return { s: [this.s0, this.s1, this.s2, this.s3], spare: this.spare };
  }

  setState(state: RandomState): void {
    [this.s0, this.s1, this.s2, this.s3] = state.s.map((v) => v >>> 0) as [number, number, number, number];
    this.spare = state.spare;
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
