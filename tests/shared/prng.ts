// Deterministic pseudo-random data for tests (mulberry32 + Box–Muller).
export function mulberry32(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export function normal(rand: () => number): number {
  return Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
}

/** Calibration-like points: y = a·x^b with multiplicative scatter sigma, x uniform in [lo, hi]. */
export function powerPoints(n: number, seed: number, a = 3.4, b = 1.65, sigma = 0.22, lo = 10, hi = 140) {
  const rand = mulberry32(seed);
  return Array.from({ length: n }, () => {
    const x = lo + (hi - lo) * rand();
    return { x, y: a * x ** b * Math.exp(sigma * normal(rand) - (sigma * sigma) / 2) };
  });
}

export function codeOf(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    const c = (e as { code?: string; name?: string }).code;
    return (e as Error).name === 'CalcError' ? String(c) : `other:${(e as Error).name}:${(e as Error).message}`;
  }
  return 'none';
}
