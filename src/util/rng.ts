/**
 * Seeded randomness. Every random draw in Farfield flows from the preset's seed
 * through `Rng.fork(label)`, so that adding a draw in one place never shifts the
 * numbers drawn anywhere else.
 */

/** 32-bit FNV-1a of a string; used to turn labels into stream ids. */
export function hashString(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

/** SplitMix32-style finaliser: spreads nearby seeds to unrelated states. */
function mix32(x: number): number {
  x = Math.imul(x ^ (x >>> 16), 0x85ebca6b);
  x = Math.imul(x ^ (x >>> 13), 0xc2b2ae35);
  return (x ^ (x >>> 16)) >>> 0;
}

export class Rng {
  private state: number;
  readonly seed: number;

  constructor(seed: number) {
    this.seed = seed >>> 0;
    this.state = mix32(this.seed ^ 0x9e3779b9);
  }

  /** Independent child stream named by `label`; same parent seed + label -> same stream. */
  fork(label: string | number): Rng {
    return new Rng(mix32(this.seed ^ hashString(String(label))) ^ hashString(`#${label}`));
  }

  /** Uniform in [0, 1) (mulberry32). */
  next(): number {
    this.state = (this.state + 0x6d2b79f5) >>> 0;
    let t = this.state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }

  /** Uniform in [lo, hi). */
  uniform(lo: number, hi: number): number {
    return lo + (hi - lo) * this.next();
  }

  /** Integer uniform in [lo, hi] inclusive. */
  int(lo: number, hi: number): number {
    return lo + Math.floor(this.next() * (hi - lo + 1));
  }

  /** Standard normal (Box–Muller). */
  normal(): number {
    let u = this.next();
    while (u <= 1e-12) u = this.next();
    const v = this.next();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  }

  /** Fisher–Yates shuffle in place. */
  shuffle<T>(items: T[]): T[] {
    for (let i = items.length - 1; i > 0; i--) {
      const j = Math.floor(this.next() * (i + 1));
      const tmp = items[i]!;
      items[i] = items[j]!;
      items[j] = tmp;
    }
    return items;
  }

  pick<T>(items: readonly T[]): T {
    if (items.length === 0) throw new Error('util/rng: pick from an empty list');
    return items[Math.floor(this.next() * items.length)]!;
  }
}
