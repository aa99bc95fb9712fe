// Deterministic pseudo-random data for tests (the generator lives in scripts/prng.ts).
import { mulberry32, normal } from '../../scripts/prng';

export { mulberry32, normal };
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
