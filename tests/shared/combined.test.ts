import { describe, expect, it } from 'vitest';
import {
  DEMO_RULE, combinedInterval, fitCalibration, lengthForBiomass, linearPredictor, leverageAt, sampleStats, tQuantile,
  type Fit,
} from '../../shared/calc';
import { readDemo } from './demo-data';
import { codeOf, mulberry32, normal } from './prng';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
const rye = fitCalibration(readDemo('cereal-rye').rows, 'power');

/** The two-sided interval, which every walk here has (its spread is known). */
function intervalOf(c: { interval: [number, number] | null }): [number, number] {
  if (!c.interval) throw new Error('expected an interval: the spread of these lengths is known');
  return c.interval;
}

describe('combined interval: hand-worked, linear model', () => {
  // Calibration (invented): x 1 2 3 4, y 3 5 4 8. By hand (tests/shared/fit.test.ts): a = 1.5, b = 1.4,
  // s² = 2.1, df = 2, x̄_cal = 2.5, Sxx = 5.
  // Walk: lengths 3, 3.5, 4 → n = 3, mean 3.5, sd = √(((−0.5)² + 0 + 0.5²)/2) = √0.25 = 0.5.
  //   ŷ = 1.5 + 1.4·3.5 = 6.4
  //   q = 1/4 + (3.5 − 2.5)²/5 = 0.45;  u_cal² = s²(1 + q) = 2.1·1.45 = 3.045
  //   slope 1.4;  u_smp² = 1.4²·0.5²/3 = 1.96·0.25/3 = 0.1633333…
  //   u_c² = 3.045 + 0.1633333… = 3.2083333…
  //   ν_eff = u_c⁴ / (u_cal⁴/2 + u_smp⁴/2) = 10.2934028 / (4.6360125 + 0.0133389) = 2.21395 (GUM G.2b)
  //   90 %: ŷ ± t(0.95, ν_eff)·u_c; lower bound ŷ − t(0.90, ν_eff)·u_c.
  // The t quantile at a fractional ν comes from tQuantile (checked on its own in t-dist.test.ts).
  const lin = fitCalibration([{ x: 1, y: 3 }, { x: 2, y: 5 }, { x: 3, y: 4 }, { x: 4, y: 8 }], 'linear');
  const c = combinedInterval(lin, sampleStats([3, 3.5, 4]), { level: 0.9 });

  it('every step', () => {
    const uCal2 = 2.1 * 1.45;
    const uSmp2 = (1.96 * 0.25) / 3;
    const uc2 = uCal2 + uSmp2;
    const nu = (uc2 * uc2) / ((uCal2 * uCal2) / 2 + (uSmp2 * uSmp2) / 2);
    expect(rel(nu, 2.21395)).toBeLessThan(1e-5);
    expect(rel(c.uCalibration ** 2, 3.045)).toBeLessThan(1e-12);
    expect(rel((c.uSampling as number) ** 2, uSmp2)).toBeLessThan(1e-12);
    expect(rel(c.dfEffective as number, nu)).toBeLessThan(1e-10);
    const k2 = tQuantile(0.95, nu);
    const k1 = tQuantile(0.9, nu);
    const [lo, hi] = intervalOf(c);
    expect(rel(lo, 6.4 - k2 * Math.sqrt(uc2))).toBeLessThan(1e-12);
    expect(rel(hi, 6.4 + k2 * Math.sqrt(uc2))).toBeLessThan(1e-12);
    expect(rel(c.lowerBound as number, 6.4 - k1 * Math.sqrt(uc2))).toBeLessThan(1e-12);
    expect(c.scale).toBe('linear');
  });

  it('the calibration part alone is the single-plot prediction interval: 6.4 ± t(0.95, 2)·√3.045', () => {
    const t = 0.9 / Math.sqrt(0.095); // df 2 closed form at p = 0.95
    expect(rel(c.calibrationOnly[0], 6.4 - t * Math.sqrt(3.045))).toBeLessThan(1e-12);
    expect(rel(c.calibrationOnly[1], 6.4 + t * Math.sqrt(3.045))).toBeLessThan(1e-12);
  });
});

describe('combined interval: hand-worked, power model on the log scale', () => {
  // The power calibration worked by hand in tests/shared/estimate.test.ts: y = 2·x^1.5·e^(±0.1) at
  // x = 1, 2, 4, 8 gives, with L = ln 2 and k = log₂ x, η(k) = ln 2 + 1.5·L·k − 0.04·(k − 1.5),
  // b = 1.5 − 0.04/L, s² = 0.016 (df 2), leverage q(k) = 1/4 + (k − 1.5)²/5.
  // Walk: 3, 4, 5 cm → n = 3, x̄ = 4 (k = 2), sd = 1.
  //   η̂ = ln 16 − 0.02;  q = 0.25 + 0.05 = 0.3;  u_cal² = 0.016·1.3 = 0.0208
  //   slope on the log scale b/x̄ = (1.5 − 0.04/L)/4;  u_smp² = (b/4)²·1²/3
  //   u_c² = u_cal² + u_smp²;  ν_eff = u_c⁴/(u_cal⁴/2 + u_smp⁴/2)
  //   interval exp(η̂ ± t(0.95, ν_eff)·u_c): quantiles of the field's biomass, so no smearing factor.
  const pts = [1, 2, 4, 8].map((x, i) => ({ x, y: 2 * x ** 1.5 * Math.exp(i % 2 ? -0.1 : 0.1) }));
  const f = fitCalibration(pts, 'power');
  it('propagation on ln(biomass) with the slope b/x̄', () => {
    const c = combinedInterval(f, sampleStats([3, 4, 5]), { level: 0.9 });
    const b = 1.5 - 0.04 / Math.LN2;
    const uCal2 = 0.016 * 1.3;
    const uSmp2 = (b / 4) ** 2 / 3;
    const uc = Math.sqrt(uCal2 + uSmp2);
    const nu = (uCal2 + uSmp2) ** 2 / (uCal2 ** 2 / 2 + uSmp2 ** 2 / 2);
    const eta = Math.log(16) - 0.02;
    expect(c.scale).toBe('log');
    expect(rel(c.uCalibration ** 2, uCal2)).toBeLessThan(1e-12);
    expect(rel((c.uSampling as number) ** 2, uSmp2)).toBeLessThan(1e-12);
    expect(rel(c.dfEffective as number, nu)).toBeLessThan(1e-10);
    const [lo, hi] = intervalOf(c);
    expect(rel(lo, Math.exp(eta - tQuantile(0.95, nu) * uc))).toBeLessThan(1e-12);
    expect(rel(hi, Math.exp(eta + tQuantile(0.95, nu) * uc))).toBeLessThan(1e-12);
    expect(rel(c.lowerBound as number, Math.exp(eta - tQuantile(0.9, nu) * uc))).toBeLessThan(1e-12);
  });
});

/**
 * Student t variates by Bailey's polar method (R. W. Bailey, "Polar generation of random variates
 * with the t-distribution", Mathematics of Computation 62, 1994): W = U1² + U2² < 1,
 * T = U1·√(ν(W^(−2/ν) − 1)/W).
 */
function tVariate(rand: () => number, nu: number): number {
  for (;;) {
    const u1 = 2 * rand() - 1;
    const u2 = 2 * rand() - 1;
    const w = u1 * u1 + u2 * u2;
    if (w > 0 && w < 1) return u1 * Math.sqrt((nu * (w ** (-2 / nu) - 1)) / w);
  }
}

/**
 * Monte Carlo propagation (JCGM 101:2008): the mean length is drawn from its scaled-and-shifted t
 * distribution (x̄ + sd/√n·t(n − 1), JCGM 101 6.4.9), and the field's value on the model scale from the
 * calibration's predictive distribution at that length (η̂(x) + s·√(1 + q(x))·t(df)). The interval is
 * the 5 % and 95 % quantiles of 200,000 draws.
 * Tolerance: 0.1·u_c on the model scale for each end, for walks of 10 or more plants on calibrations
 * with 20 or more degrees of freedom. The Monte Carlo quantiles alone scatter by about
 * √(0.05·0.95/M)/φ(1.645) ≈ 0.015·u_c (1 standard error); the rest is what the GUM formula
 * approximates: a t(n − 1) mean has (n − 1)/(n − 3) times the variance sd²/n (1.29× at n = 10) that the
 * GUM formula uses, and Welch–Satterthwaite only partly makes up for it; also a straight line at x̄.
 * Found: up to 0.07·u_c when the plants' spread dominates, under 0.05·u_c when the calibration does.
 */
function monteCarlo(fit: Fit, n: number, mean: number, sd: number, seed: number): [number, number] {
  const rand = mulberry32(seed);
  const M = 200_000;
  const draws = new Float64Array(M);
  for (let i = 0; i < M; i++) {
    const x = mean + (sd / Math.sqrt(n)) * tVariate(rand, n - 1);
    const ux = fit.residualStdError * Math.sqrt(1 + leverageAt(fit, x));
    draws[i] = linearPredictor(fit, x) + ux * tVariate(rand, fit.df);
  }
  draws.sort();
  const quantile = (p: number) => {
    const v = draws[Math.floor(p * M)];
    if (v === undefined) throw new Error(`no draw at the ${p} quantile of ${M}`);
    return v;
  };
  return [quantile(0.05), quantile(0.95)];
}

// A linear calibration of 25 invented points (seeded scatter, df 23), and a small one of 8 (df 6).
const LIN25 = (() => {
  const rand = mulberry32(77);
  return fitCalibration(Array.from({ length: 25 }, (_, i) => ({ x: 20 + 3 * i, y: 60 * (20 + 3 * i) + 150 * normal(rand) })), 'linear');
})();
const LIN8 = fitCalibration(
  ([[20, 120], [30, -90], [40, 40], [50, -150], [60, 80], [70, 30], [80, -60], [90, 110]] as const).map(([x, scatter]) => ({ x, y: 60 * x + scatter })),
  'linear',
);

describe('combined interval against a Monte Carlo propagation (JCGM 101)', () => {
  it.each([
    ['demo rye (power), 10 plants', rye, [70, 92, 81, 77, 88, 95, 73, 84, 79, 90]],
    ['demo rye (power), 12 plants with a wide spread', rye, [55, 100, 72, 91, 64, 83, 97, 60, 78, 88, 69, 94]],
    ['linear calibration of 25 points (df 23), 10 plants', LIN25, [48, 55, 61, 44, 52, 50, 58, 46, 53, 57]],
  ])('%s', (_name, fit, lengths) => {
    const s = sampleStats(lengths as number[]);
    const c = combinedInterval(fit as Fit, s, { level: 0.9 });
    const [mcLo, mcHi] = monteCarlo(fit as Fit, s.n, s.meanCm, s.sdCm as number, 20260);
    const log = (fit as Fit).model === 'power';
    const toScale = (v: number) => (log ? Math.log(v) : v);
    const uc = c.uCombined as number;
    const [lo, hi] = intervalOf(c);
    expect(Math.abs(toScale(lo) - mcLo)).toBeLessThan(0.1 * uc);
    expect(Math.abs(toScale(hi) - mcHi)).toBeLessThan(0.1 * uc);
  });

  it('with very few plants or calibration points the Monte Carlo interval is the wider one (a known limit of Welch–Satterthwaite)', () => {
    // JCGM 101 gives a mean of n values a t(n − 1) distribution whose variance is (n − 1)/(n − 3)
    // times sd²/n (3× at n = 4); likewise t(df) for the calibration part (1.5× at df 6). The GUM
    // formula keeps the plain variances and widens only through ν_eff, so with 4–5 plants or a
    // calibration of 8 points its interval is narrower, here by 15–35 % of u_c at each end. The
    // rule's minimum plants (demo 10) keeps small walks borderline at best, and a calibration of 8
    // points is not one to publish; shared/calc/README.md says so.
    for (const [fit, lengths] of [[rye, [65, 85, 80, 100]], [LIN8, [48, 55, 61, 44, 52, 50, 58, 46, 53, 57]]] as const) {
      const s = sampleStats(lengths as unknown as number[]);
      const c = combinedInterval(fit, s, { level: 0.9 });
      const [mcLo, mcHi] = monteCarlo(fit, s.n, s.meanCm, s.sdCm as number, 20261);
      const toScale = (v: number) => (fit.model === 'power' ? Math.log(v) : v);
      const [lo, hi] = intervalOf(c);
      expect(mcLo).toBeLessThan(toScale(lo));
      expect(mcHi).toBeGreaterThan(toScale(hi));
    }
  });
});

describe('combined interval: behaviour', () => {
  const T = DEMO_RULE.thresholdKgHa;
  const width = (lengths: number[]) => {
    const c = combinedInterval(rye, sampleStats(lengths));
    return c.interval ? c.interval[1] - c.interval[0] : Infinity;
  };

  it('fewer plants or more spread widen it: [80] (spread unknown) > [75, 85] > [75, 80, 85] > ten plants', () => {
    const ten = [75, 85, 80, 78, 82, 76, 84, 79, 81, 80];
    expect(width([80])).toBe(Infinity);
    expect(width([75, 85])).toBeGreaterThan(width([75, 80, 85]));
    expect(width([75, 80, 85])).toBeGreaterThan(width(ten));
    expect(width([70, 80, 90])).toBeGreaterThan(width([75, 80, 85]));
    // Never narrower than the calibration part alone.
    const c = combinedInterval(rye, sampleStats(ten));
    const [lo, hi] = intervalOf(c);
    expect(lo).toBeLessThan(c.calibrationOnly[0]);
    expect(hi).toBeGreaterThan(c.calibrationOnly[1]);
    expect(T).toBeGreaterThan(0);
  });

  it('one plant, or two identical lengths: the spread is unknown, no interval', () => {
    for (const lengths of [[80], [82, 82], [70, 70, 70, 70, 70, 70, 70, 70, 70, 70]]) {
      const c = combinedInterval(rye, sampleStats(lengths));
      expect(c.spreadKnown).toBe(false);
      expect(c.interval).toBeNull();
      expect(c.lowerBound).toBeNull();
    }
  });

  it('the one-sided lower bound sits inside the two-sided interval at the same level', () => {
    const c = combinedInterval(rye, sampleStats([70, 92, 81, 77, 88]), { level: 0.9 });
    expect(c.lowerBound as number).toBeGreaterThan(intervalOf(c)[0]);
    expect(c.lowerBound as number).toBeLessThan(Math.exp(linearPredictor(rye, c.lowerBound ? 81.6 : 0)));
  });

  it('bad input is a typed error', () => {
    expect(codeOf(() => sampleStats([]))).toBe('empty');
    expect(codeOf(() => sampleStats([80, NaN]))).toBe('not_finite');
    expect(codeOf(() => sampleStats([80, -1]))).toBe('non_positive');
    expect(codeOf(() => combinedInterval(rye, { n: 0, meanCm: 80, sdCm: 1 }))).toBe('bad_option');
    expect(codeOf(() => combinedInterval(rye, sampleStats([80, 81]), { level: 90 }))).toBe('bad_level');
  });

  it('a threshold length exists for the demo rye (used by the verdict tests)', () => {
    expect(lengthForBiomass(rye, T).ok).toBe(true);
  });
});
