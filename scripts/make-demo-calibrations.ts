/*
 * Generates the DEMO calibration data sets (invented data, not measurements):
 *   seeds/data/demo-calibration-cereal-rye.csv   ~150 points
 *   seeds/data/demo-calibration-triticale.csv    ~150 points
 *   seeds/data/demo-calibration-barley.csv        ~20 points (a draft set)
 * Run: npx tsx scripts/make-demo-calibrations.ts   (deterministic: a seeded PRNG, same files every run)
 *
 * Each set follows a power curve y = a·L^b with multiplicative log-normal scatter of about 22 %,
 * centred so that the MEAN biomass at a length follows the curve (log-mean −σ²/2); a power fit with a
 * smearing correction then recovers the curve. The curves are pinned to the trade's rules of thumb
 * (common practice, no published source): cereal rye reaches 4,500 lb/ac (5,043.83 kg/ha) at about
 * 31 in (78.74 cm) mean main shoot length, triticale at about 27 in (68.58 cm). Barley has no such rule
 * of thumb; its draft curve (4,500 lb/ac at 75 cm) is invented. Sites are invented "Demo plot" labels.
 */
import { writeFileSync, mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { inToCm, lbPerAcToKgPerHa } from '../shared/calc/units';
import { mulberry32, normal } from './prng';

const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..');
const OUT = join(ROOT, 'seeds', 'data');

interface DemoSpec {
  file: string;
  seed: number;
  count: number;
  exponent: number;
  /** Length (cm) at which the curve reaches the threshold. */
  lengthAtThresholdCm: number;
  minCm: number;
  maxCm: number;
  sigma: number;
  sites: string[];
  note: string;
}

const THRESHOLD = lbPerAcToKgPerHa(4500);

const SPECS: DemoSpec[] = [
  {
    file: 'demo-calibration-cereal-rye.csv',
    seed: 20240131,
    count: 150,
    exponent: 1.6,
    lengthAtThresholdCm: inToCm(31),
    minCm: 10,
    maxCm: 140,
    sigma: 0.22,
    sites: Array.from({ length: 8 }, (_, i) => `Demo plot ${i + 1}`),
    note: 'demo data (invented)',
  },
  {
    file: 'demo-calibration-triticale.csv',
    seed: 20240229,
    count: 150,
    exponent: 1.55,
    lengthAtThresholdCm: inToCm(27),
    minCm: 10,
    maxCm: 130,
    sigma: 0.23,
    sites: Array.from({ length: 8 }, (_, i) => `Demo plot ${i + 9}`),
    note: 'demo data (invented)',
  },
  {
    file: 'demo-calibration-barley.csv',
    seed: 20240315,
    count: 20,
    exponent: 1.5,
    lengthAtThresholdCm: 75,
    minCm: 15,
    maxCm: 110,
    sigma: 0.22,
    sites: ['Demo plot 17', 'Demo plot 18'],
    note: 'demo draft data (invented)',
  },
];

function generate(spec: DemoSpec): string {
  const rand = mulberry32(spec.seed);
  const a = THRESHOLD / spec.lengthAtThresholdCm ** spec.exponent;
  const span = spec.maxCm - spec.minCm;
  const rows = ['length_cm,biomass_kg_ha,site,note'];
  for (let i = 0; i < spec.count; i++) {
    // More plants at mid lengths than at the extremes, as in a real sampling campaign.
    const u = 0.6 * ((rand() + rand()) / 2) + 0.4 * rand();
    const length = Math.round((spec.minCm + span * u) * 2) / 2;
    const eps = spec.sigma * normal(rand) - (spec.sigma * spec.sigma) / 2;
    const biomass = Math.round(a * length ** spec.exponent * Math.exp(eps));
    const site = spec.sites[Math.floor(rand() * spec.sites.length)];
    rows.push(`${length.toFixed(1)},${biomass},${site},${spec.note}`);
  }
  return rows.join('\n') + '\n';
}

mkdirSync(OUT, { recursive: true });
for (const spec of SPECS) {
  writeFileSync(join(OUT, spec.file), generate(spec));
  console.log(`wrote seeds/data/${spec.file} (${spec.count} points)`);
}
