import { decideVerdict, type VerdictResult } from '../../../shared/calc/verdict';
import type { Fit } from '../../../shared/calc/fit-types';
import type { CalibrationItem } from '../../lib/estimate-inputs';
import type { RuleSettings } from '../../lib/rule-settings';

/**
 * The live estimate on the phone: the estimation core's decideVerdict (the same code the server
 * runs) on the accepted lengths so far, under the credit rule's decision basis, confidence and
 * minimum plants. Well under a millisecond per keystroke (npm run bench).
 */
export type LiveEstimate =
  | { kind: 'none' }
  | { kind: 'no_calibration' }
  | { kind: 'not_loaded' }
  | { kind: 'unusable'; message: string }
  | { kind: 'ok'; verdict: VerdictResult; calibration: CalibrationItem };

export function liveEstimate(input: {
  calibrationId: string | null;
  calibrations: CalibrationItem[] | undefined;
  rule: RuleSettings | undefined;
  lengthsCm: number[];
}): LiveEstimate {
  if (input.calibrationId === null) return { kind: 'no_calibration' };
  if (!input.calibrations || input.rule === undefined) return { kind: 'not_loaded' };
  const calibration = input.calibrations.find((c) => c.id === input.calibrationId);
  if (!calibration) return { kind: 'no_calibration' };
  if (input.lengthsCm.length === 0) return { kind: 'none' };
  try {
    const verdict = decideVerdict(calibration.fit as unknown as Fit, input.lengthsCm, input.rule);
    return { kind: 'ok', verdict, calibration };
  } catch (err) {
    return { kind: 'unusable', message: err instanceof Error ? err.message : String(err) };
  }
}
