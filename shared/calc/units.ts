import { requireFinite } from './validate';

/*
 * Exact conversion factors (all are exact by definition, not measured):
 * - 1 in = 2.54 cm                      (international inch, 1959; NIST SP 811 App. B, HB 44 App. C)
 * - 1 ft = 0.3048 m                     (international foot, same sources)
 * - 1 lb = 0.45359237 kg                (international avoirdupois pound, same sources)
 * - 1 acre = 4046.8564224 m²            (acre of 43,560 international ft²; since 2023 the U.S. survey
 *                                        foot is retired, so this is the acre in use. SP 811 (2008) still
 *                                        lists the survey acre 4046.873 m²; the 4 ppm gap is immaterial.)
 * Storage is SI (cm, kg/ha, ha); these helpers convert for display.
 */
export const CM_PER_IN = 2.54;
export const M_PER_FT = 0.3048;
export const KG_PER_LB = 0.45359237;
export const M2_PER_ACRE = 4046.8564224;
export const HA_PER_ACRE = 0.40468564224; // M2_PER_ACRE / 10 000, written out so it is exact in decimal

export function inToCm(inches: number): number {
  return requireFinite(inches, 'inches') * CM_PER_IN;
}

export function cmToIn(cm: number): number {
  return requireFinite(cm, 'cm') / CM_PER_IN;
}

/** lb/ac → kg/ha: ×0.45359237 kg/lb ÷ 0.40468564224 ha/ac (≈ ×1.12085). */
export function lbPerAcToKgPerHa(lbPerAc: number): number {
  return (requireFinite(lbPerAc, 'lbPerAc') * KG_PER_LB) / HA_PER_ACRE;
}

export function kgPerHaToLbPerAc(kgPerHa: number): number {
  return (requireFinite(kgPerHa, 'kgPerHa') * HA_PER_ACRE) / KG_PER_LB;
}

export function acToHa(acres: number): number {
  return requireFinite(acres, 'acres') * HA_PER_ACRE;
}

export function haToAc(hectares: number): number {
  return requireFinite(hectares, 'hectares') / HA_PER_ACRE;
}

export function mToFt(metres: number): number {
  return requireFinite(metres, 'metres') / M_PER_FT;
}

export function ftToM(feet: number): number {
  return requireFinite(feet, 'feet') * M_PER_FT;
}
