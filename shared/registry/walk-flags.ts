import { USUAL_SAMPLE_SIZE } from '../calc/estimate';
import { OUTLIER_Z, median, outlierIndexes, robustZ } from '../calc/outliers';
import type { MorePlantsAdvice, VerdictReason } from '../calc/verdict';
import type { UnitSystem } from '../format/figures';
import { adviceText, reasonText } from '../format/messages';
import type { WalkEstimate } from '../schemas/walks';

/*
 * What a reviewer should look at twice before approving a field walk: plants far from the
 * others, an estimate outside the calibrated lengths, no estimate at all, fewer plants than the
 * rule's minimum, and a borderline verdict (decided when the walk was stored, under the rule's
 * decision basis: shared/calc/verdict.ts; never re-judged here). Pure: the office pages
 * (and later the phone) put the words in the reader's units.
 */

// The outlier rule lives in the estimation core, shared with the capture app; re-exported here for
// the office pages that import it from this file.
export { MAD_SCALE, MEAN_AD_SCALE, OUTLIER_MIN_N, OUTLIER_Z, median, outlierIndexes, robustZ } from '../calc/outliers';

export type WalkFlagCode = 'outlier' | 'extrapolated' | 'no_calibration' | 'few_plants' | 'borderline';

export type WalkFlag =
  | { code: 'outlier'; plants: { stop: number; lengthCm: number; z: number }[]; medianCm: number }
  | { code: 'extrapolated'; meanLengthCm: number }
  | { code: 'no_calibration' }
  | { code: 'few_plants'; n: number; usual: number }
  | { code: 'borderline'; reasons: VerdictReason[]; morePlants: MorePlantsAdvice | null };

/** Short badge words, in the order flags are listed. */
export const WALK_FLAG_LABELS: Record<WalkFlagCode, string> = {
  outlier: 'outlier',
  extrapolated: 'extrapolated',
  no_calibration: 'no calibration',
  few_plants: 'few plants',
  borderline: 'borderline',
};

/** The flags of one walk, in a fixed order: outlier, extrapolated, no calibration, few plants, borderline. */
export function walkFlags(walk: { plants: readonly { stop: number; lengthCm: number }[]; estimate: WalkEstimate | null }): WalkFlag[] {
  const flags: WalkFlag[] = [];
  const lengths = walk.plants.map((p) => p.lengthCm);
  const z = robustZ(lengths);
  const odd = outlierIndexes(lengths);
  if (odd.length) {
    flags.push({ code: 'outlier', plants: odd.map((i) => ({ stop: walk.plants[i]!.stop, lengthCm: lengths[i]!, z: z[i]! })), medianCm: median(lengths) });
  }
  const e = walk.estimate;
  if (e?.extrapolated) flags.push({ code: 'extrapolated', meanLengthCm: e.meanLengthCm });
  if (!e) flags.push({ code: 'no_calibration' });
  // The rule's minimum the walk was judged by; the usual sample for walks stored before it existed.
  const usual = e?.minPlants ?? USUAL_SAMPLE_SIZE;
  if (walk.plants.length < usual) flags.push({ code: 'few_plants', n: walk.plants.length, usual });
  // The stored verdict, as the phone showed it; snapshots from before decision bases have none.
  if (e?.verdict === 'borderline') flags.push({ code: 'borderline', reasons: e.verdictReasons ?? [], morePlants: e.morePlants ?? null });
  return flags;
}

/** Stops of the plants flagged as outliers. */
export const outlierStops = (flags: readonly WalkFlag[]): Set<number> =>
  new Set(flags.flatMap((f) => (f.code === 'outlier' ? f.plants.map((p) => p.stop) : [])));

/**
 * Plain words for a flag; `length` and `biomass` format SI values in the reader's units, and
 * `system` names those units for the verdict's reasons (shared/format; US customary if not given).
 */
export function explainWalkFlag(flag: WalkFlag, units: { length: (cm: number) => string; biomass: (kgHa: number) => string; system?: UnitSystem }): string {
  switch (flag.code) {
    case 'outlier': {
      const list = flag.plants.map((p) => `stop ${p.stop} (${units.length(p.lengthCm)})`).join(', ');
      const one = flag.plants.length === 1;
      return (
        `${one ? 'One plant is' : `${flag.plants.length} plants are`} far from the others: ${list}, against a median of ${units.length(flag.medianCm)} ` +
        `(more than ${OUTLIER_Z} robust z from the median). Check for a typing slip, a tiller measured instead of the main shoot, or a plant from an odd patch.`
      );
    }
    case 'extrapolated':
      return `The mean main shoot length (${units.length(flag.meanLengthCm)}) is outside the lengths the calibration was fitted on, so the estimate is an extrapolation. Treat it with caution.`;
    case 'no_calibration':
      return 'There is no estimate: no published calibration was assigned to this crop when the walk was stored. The walk cannot earn the credit in a register.';
    case 'few_plants':
      return `${flag.n} plant${flag.n === 1 ? '' : 's'} measured; the usual sample is ${flag.usual}, one per stop. The estimate is less certain.`;
    case 'borderline': {
      const reader = { lang: 'en' as const, units: units.system ?? 'us' };
      const why = flag.reasons.filter((r) => r.code !== 'point_meets' && r.code !== 'point_below').map((r) => reasonText(r, reader));
      return ['Borderline: this walk does not count until it is walked again or more plants are measured.', ...why, ...(flag.morePlants ? [adviceText(flag.morePlants, reader)] : [])].join(' ');
    }
  }
}
