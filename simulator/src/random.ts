/**
 * Seeded randomness. The simulation must be a pure function of (seed, time) so that the demo can
 * be re-run after a restart and land on exactly the same history: streams for sequential draws,
 * and a hash for random access ("the weather on day 12") without replaying what came before.
 */

/** A 32-bit hash of integers (a variant of the murmur3 finaliser), as a fraction in [0, 1). */
export function hashUnit(...parts: number[]): number {
  let h = 0x9e3779b9;
  for (const part of parts) {
    // Mix the integer and fractional halves so that large or fractional inputs both count.
    const lo = part | 0;
    const hi = Math.floor(part / 4294967296) | 0;
    h = Math.imul(h ^ lo, 0x85ebca6b);
    h = (h << 13) | (h >>> 19);
    h = Math.imul(h ^ hi, 0xc2b2ae35);
    h ^= h >>> 16;
  }
  h = Math.imul(h ^ (h >>> 16), 0x85ebca6b);
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35);
  h ^= h >>> 16;
  return (h >>> 0) / 4294967296;
}

/** A fast seeded stream of fractions in [0, 1) (mulberry32). */
export class RandomStream {
  private state: number;

  constructor(seed: number) {
    this.state = Math.floor(hashUnit(seed) * 4294967296) >>> 0;
  }

  next(): number {
    this.state = (this.state + 0x6d2b79f5) | 0;
    let t = this.state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }

  /** Uniform in [low, high). */
  between(low: number, high: number): number {
    return low + (high - low) * this.next();
  }

  /** Roughly normal noise (sum of three uniforms), mean 0, standard deviation `sigma`. */
  noise(sigma: number): number {
    return (this.next() + this.next() + this.next() - 1.5) * 2 * sigma;
  }
}

/** A stable number from a text (a site key), for seeding per-site streams. */
export function seedFromText(text: string): number {
  let h = 2166136261;
  for (let i = 0; i < text.length; i += 1) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 16777619);
  }
  return h >>> 0;
}
