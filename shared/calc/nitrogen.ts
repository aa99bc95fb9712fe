import { CalcError } from './errors';
import { requireNonNegative } from './validate';

export interface ShootNitrogen {
  /** kg N/ha held in the shoots: biomass × tissue N %. */
  kgNPerHa: number;
  /** The biomass interval carried through the same product, kg N/ha; null without one. */
  interval: [number, number] | null;
  tissueNPercent: number;
}

/**
 * Nitrogen in the shoots = oven-dry biomass × tissue N % / 100. The lab's N % is taken as exact:
 * the interval is the biomass interval scaled, so it understates the uncertainty by the lab's own
 * (usually small) error. Information beside the verdict, never part of it; the lab value decides.
 */
export function shootNitrogen(biomassKgHa: number, tissueNPercent: number, biomassIntervalKgHa: [number, number] | null = null): ShootNitrogen {
  const b = requireNonNegative(biomassKgHa, 'biomassKgHa');
  const pct = requireNonNegative(tissueNPercent, 'tissueNPercent');
  if (pct > 10) {
    throw new CalcError('bad_option', 'A tissue nitrogen content above 10 % is not plausible for shoots; check the lab value.', 'tissueNPercent');
  }
  let interval: [number, number] | null = null;
  if (biomassIntervalKgHa !== null) {
    const lo = requireNonNegative(biomassIntervalKgHa[0], 'biomassIntervalKgHa');
    const hi = requireNonNegative(biomassIntervalKgHa[1], 'biomassIntervalKgHa');
    if (lo > hi) throw new CalcError('bad_option', 'The biomass interval must run from low to high.', 'biomassIntervalKgHa');
    interval = [(lo * pct) / 100, (hi * pct) / 100];
  }
  return { kgNPerHa: (b * pct) / 100, interval, tissueNPercent: pct };
}
