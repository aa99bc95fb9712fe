import { useMemo } from 'react';
import { useQuery } from '@tanstack/react-query';
import { calibrationsQuery } from '../../lib/estimate-inputs';
import { useRuleSettings } from '../../lib/use-rule-settings';
import { liveEstimate } from '../estimate/public';
import type { WalkDraft } from './drafts';

/** The live estimate and verdict for a walk in progress, from the calibration and rule kept on the phone. */
export function useLiveEstimate(draft: WalkDraft, lengthsCm: number[]) {
  const calibrations = useQuery(calibrationsQuery);
  const rule = useRuleSettings();
  const key = lengthsCm.join(',');
  return useMemo(
    () =>
      liveEstimate({
        calibrationId: draft.planting.calibrationId,
        calibrations: calibrations.data?.items,
        rule,
        lengthsCm,
      }),
    // lengthsCm is a fresh array each render; its contents (the key) decide.
    [draft.planting.calibrationId, calibrations.data, rule, key],
  );
}
