/*
 * Benchmarks of the estimation core. Targets from the issue: compareModels on 150 points < 5 ms;
 * one estimate from a stored Fit < 20 µs. Each case is timed in batches; we report the median batch
 * time divided by the batch size (robust to GC pauses and JIT warm-up, which runs first).
 * Run with `npx tsx bench/calc.ts`; it is not part of `npm run bench` (its 10,000-point case is slow).
 */
import { compareModels, estimateBiomass, fitCalibration, lookupTable, predict, DEMO_RULE, type Fit } from '../shared/calc';
import { pathToFileURL } from 'node:url';
import { mulberry32 } from '../scripts/prng';

/** Calibration-like points: y = 3.4·x^1.65 with ~22 % multiplicative scatter. */
function points(n: number, seed: number) {
  const rand = mulberry32(seed);
  return Array.from({ length: n }, () => {
    const x = 10 + 130 * rand();
    const z = Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
    return { x, y: 3.4 * x ** 1.65 * Math.exp(0.22 * z - 0.0242) };
  });
}

export interface BenchResult {
  name: string;
  medianUs: number;
  opsPerSec: number;
  samples: number;
  batch: number;
}

let sink = 0; // keeps results alive so the work cannot be optimised away

export function measure(name: string, fn: () => unknown, opts: { batch: number; samples: number; warmup?: number }): BenchResult {
  for (let i = 0; i < (opts.warmup ?? opts.batch * 3); i++) sink += Number(Boolean(fn()));
  const times: number[] = [];
  for (let s = 0; s < opts.samples; s++) {
    const t0 = performance.now();
    for (let i = 0; i < opts.batch; i++) sink += Number(Boolean(fn()));
    times.push((performance.now() - t0) / opts.batch);
  }
  times.sort((a, b) => a - b);
  const medianMs = times[Math.floor(times.length / 2)] ?? NaN;
  return { name, medianUs: medianMs * 1000, opsPerSec: 1000 / medianMs, samples: opts.samples, batch: opts.batch };
}

export function runCalcBench(): BenchResult[] {
  const p150 = points(150, 1);
  const p10k = points(10_000, 2);
  const stored: Fit = JSON.parse(JSON.stringify(fitCalibration(p150, 'power')));
  const lengths = [71.5, 84, 77, 92.5, 66, 80.5, 88, 74, 79.5, 83];
  const opts = { thresholdKgHa: DEMO_RULE.thresholdKgHa };
  let k = 0;

  const results = [
    measure('compareModels, 150 points', () => compareModels(p150), { batch: 20, samples: 60, warmup: 300 }),
    measure('compareModels, 10,000 points', () => compareModels(p10k), { batch: 1, samples: 15, warmup: 3 }),
    measure('fitCalibration power, 150 points', () => fitCalibration(p150, 'power'), { batch: 50, samples: 60 }),
    // Estimate from a JSON round-tripped Fit: a fresh parse each time would measure JSON, not us;
    // the per-object validity check is cached, so this is the phone's steady state after load.
    measure('estimateBiomass, 10 plants, stored Fit', () => estimateBiomass(stored, lengths, opts), { batch: 2000, samples: 60 }),
    measure('estimateBiomass, 10 plants, fresh JSON Fit each call', () => estimateBiomass(JSON.parse(JSON.stringify(stored)), lengths, opts), { batch: 500, samples: 40 }),
    measure('predict, stored Fit', () => predict(stored, 40 + (k++ % 60)), { batch: 20_000, samples: 60 }),
    measure('lookupTable 1-in steps (calibrated range)', () => lookupTable(stored, { unit: 'in', step: 1 }), { batch: 200, samples: 60 }),
    measure('lookupTable 2-cm steps (calibrated range)', () => lookupTable(stored, { unit: 'cm', step: 2 }), { batch: 200, samples: 60 }),
  ];
  if (sink === -1) console.log(sink);
  return results;
}

export function printTable(title: string, rows: BenchResult[]): void {
  const fmtUs = (us: number) => (us >= 1000 ? `${(us / 1000).toFixed(2)} ms` : `${us.toFixed(2)} µs`);
  const w = Math.max(...rows.map((r) => r.name.length));
  console.log(`\n${title}`);
  console.log(`${'case'.padEnd(w)}  ${'median/op'.padStart(12)}  ${'ops/s'.padStart(12)}  runs`);
  for (const r of rows) {
    console.log(
      `${r.name.padEnd(w)}  ${fmtUs(r.medianUs).padStart(12)}  ${Math.round(r.opsPerSec).toLocaleString('en-US').padStart(12)}  ${r.samples}×${r.batch}`,
    );
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) printTable('Estimation core (shared/calc)', runCalcBench());
