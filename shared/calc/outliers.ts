/*
 * The one outlier rule for the phone and the office: a plant whose modified z-score
 * M = 0.6745·|x − median| / MAD is above 3.5 (B. Iglewicz and D. C. Hoaglin, "How to Detect and
 * Handle Outliers", ASQC Quality Press, 1993; quoted from memory), from 4 plants on. Both the
 * capture app and the review page call outlierIndexes, so the plant flagged on the phone is the
 * plant flagged in review.
 */

/** Cut-off of the modified z-score. */
export const OUTLIER_Z = 3.5;
/** 1 / Φ⁻¹(0.75) ≈ 1/0.6745: makes the MAD estimate the standard deviation of normal data. */
export const MAD_SCALE = 1.4826;
/** √(π/2): the same for the mean absolute deviation, used when the MAD is 0 (from memory). */
export const MEAN_AD_SCALE = 1.253314;
/** With fewer plants the median and MAD say too little to call one plant odd. */
export const OUTLIER_MIN_N = 4;

export function median(values: readonly number[]): number {
  if (!values.length) return NaN;
  const s = [...values].sort((a, b) => a - b);
  const mid = s.length >> 1;
  return s.length % 2 ? s[mid]! : (s[mid - 1]! + s[mid]!) / 2;
}

/**
 * The modified z-score of each value: |x − median| / (1.4826·MAD). When more than half the values
 * are equal the MAD is 0; then the mean absolute deviation from the median stands in (× 1.253314).
 * All zeros when every value is the same; empty below OUTLIER_MIN_N values.
 */
export function robustZ(values: readonly number[]): number[] {
  if (values.length < OUTLIER_MIN_N) return [];
  const m = median(values);
  const dev = values.map((v) => Math.abs(v - m));
  const mad = median(dev);
  let scale = MAD_SCALE * mad;
  if (!(scale > 0)) scale = MEAN_AD_SCALE * (dev.reduce((a, b) => a + b, 0) / dev.length);
  if (!(scale > 0)) return values.map(() => 0);
  return dev.map((d) => d / scale);
}

/** Indexes of the values whose modified z-score is above `cutoff` (none below OUTLIER_MIN_N values). */
export function outlierIndexes(values: readonly number[], cutoff = OUTLIER_Z): number[] {
  const z = robustZ(values);
  const out: number[] = [];
  z.forEach((v, i) => {
    if (v > cutoff) out.push(i);
  });
  return out;
}
