import { useMemo } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useUnits } from '../session/api';
import { calibrationsQuery, rulesQuery } from '../../lib/estimate-inputs';
import { liveEstimate } from '../estimate/live';
import type { WalkDraft } from './drafts';

/** The live estimate for a walk in progress, from the calibration and rule kept on the phone. */
export function useLiveEstimate(draft: WalkDraft, lengthsCm: number[]) {
  const units = useUnits();
  const calibrations = useQuery(calibrationsQuery);
  const rules = useQuery(rulesQuery);
  const key = lengthsCm.join(',');
  return useMemo(
    () =>
      liveEstimate({
        calibrationId: draft.planting.calibrationId,
        calibrations: calibrations.data?.items,
        thresholdKgHa: rules.data?.thresholdKgHa,
        lengthsCm,
        units,
      }),
    // lengthsCm is a fresh array each render; its contents (the key) decide.
    [draft.planting.calibrationId, calibrations.data, rules.data, key, units],
  );
}
