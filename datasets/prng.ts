/**
 * A small seeded generator so the demo data are the same on every machine: mulberry32 (a 32-bit mixing PRNG,
 * public domain), seeded from a string by FNV-1a. Normal deviates by Box–Muller.
 */
function hashSeed(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

export interface Random {
  /** Uniform on [0, 1). */
  next(): number;
  normal(mean?: number, sd?: number): number;
  pick<T>(items: readonly T[]): T;
  between(min: number, max: number): number;
}

export function mulberry32(seed: number | string): Random {
  let a = typeof seed === "string" ? hashSeed(seed) : seed >>> 0;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return {
    next,
    normal(mean = 0, sd = 1) {
      const u = Math.max(next(), 1e-12);
      const v = next();
      return mean + sd * Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
    },
    pick: (items) => items[Math.floor(next() * items.length)]!,
    between: (min, max) => min + (max - min) * next(),
  };
}
