// Seeded pseudo-random numbers (mulberry32: a 32-bit state, public-domain generator by T. Ettinger).
// The state is a plain number so it can live inside the immutable plant state.

export function seedState(seed: number): number {
  // Mix the seed so nearby seeds give unrelated streams (a 32-bit integer hash step).
  let h = (Math.floor(seed) ^ 0x9e3779b9) >>> 0;
  h = Math.imul(h ^ (h >>> 16), 0x85ebca6b) >>> 0;
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35) >>> 0;
  return (h ^ (h >>> 16)) >>> 0;
}

export class Rng {
  constructor(public state: number) {}
  /** Uniform in [0, 1). */
  next(): number {
    this.state = (this.state + 0x6d2b79f5) >>> 0;
    let t = this.state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }
  /** Approximately standard normal (sum of three uniforms, variance-scaled): cheap and bounded. */
  normal(): number {
    return (this.next() + this.next() + this.next() - 1.5) * 2;
  }
}
