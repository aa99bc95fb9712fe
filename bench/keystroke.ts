/**
 * The phone's work per keystroke in a walk's length field: every stop's check, the usable lengths
 * and the live estimate, with the tenth value changing each time. Pure (no node: imports), so the
 * same code is timed in node (bench/capture-size.ts) and inside Chromium (bench/first-load.ts).
 */
import { fitCalibration, DEMO_RULE, DEMO_VERDICT_RULE, type Fit } from '../shared/calc';
import { newDraft, type WalkDraft } from '../client/features/entry/drafts';
import { acceptedLengthsCm, stopStates } from '../client/features/entry/draft-review';
import { liveEstimate } from '../client/features/estimate/live';
import type { CalibrationItem } from '../client/lib/estimate-inputs';

export function makeKeystroke(): () => unknown {
  // A power curve like the demo rye calibration (y = 3.4·x^1.65, ~20 % scatter), JSON round-tripped.
  const points = Array.from({ length: 60 }, (_, i) => {
    const x = 20 + (i * 110) / 59;
    return { x, y: 3.4 * x ** 1.65 * (1 + 0.2 * Math.sin(i * 1.7)) };
  });
  const fit = JSON.parse(JSON.stringify(fitCalibration(points, 'power'))) as Fit;
  const calibration = { id: 'c1', crop: 'cereal_rye', version: 1, model: 'power', fit } as unknown as CalibrationItem;
  const base = newDraft({
    id: '00000000-0000-4000-8000-000000000001',
    userId: 'u1',
    planting: { plantingId: 'p1', fieldName: 'F', ranchName: 'R', crop: 'cereal_rye', variety: null, calibrationId: 'c1', areaHa: 8 },
    unit: 'in',
    walkedOn: '2027-02-14',
    now: 0,
  });
  const typed = ['30.5', '31', '28.75', '33', '29.5', '32', '30', '27.5', '31.25', '3'];
  let k = 0;
  return () => {
    const values: WalkDraft['values'] = {};
    typed.forEach((v, i) => (values[i + 1] = v));
    values[10] = String(30 + (k++ % 5)); // the value being typed changes each time
    const states = stopStates({ ...base, values });
    return liveEstimate({
      calibrationId: 'c1',
      calibrations: [calibration],
      rule: { thresholdKgHa: DEMO_RULE.thresholdKgHa, ...DEMO_VERDICT_RULE, edgeMarginM: 10 },
      lengthsCm: acceptedLengthsCm(states),
    });
  };
}

/** Median time of one keystroke in ms: batches of `batch` calls after a warm-up, `samples` batches. */
export function timeKeystroke(fn: () => unknown, batch = 200, samples = 40): number {
  let sink = 0;
  for (let i = 0; i < batch * 3; i++) sink += Number(Boolean(fn()));
  const times: number[] = [];
  for (let s = 0; s < samples; s++) {
    const t0 = performance.now();
    for (let i = 0; i < batch; i++) sink += Number(Boolean(fn()));
    times.push((performance.now() - t0) / batch);
  }
  times.sort((a, b) => a - b);
  if (sink === -1) console.log(sink);
  return times[Math.floor(times.length / 2)] ?? NaN;
}
