/**
 * Growth stages for the picker: Zadoks decimal codes with the Feekes stage usually printed beside
 * them in extension charts (an approximate correspondence, common practice; the scales do not map
 * one to one). Descriptions are in the language files under `stages`.
 */
export const STAGES = [
  { code: 'Z12', feekes: '1' },
  { code: 'Z13', feekes: '1' },
  { code: 'Z21', feekes: '2' },
  { code: 'Z22', feekes: '2' },
  { code: 'Z23', feekes: '2' },
  { code: 'Z25', feekes: '3' },
  { code: 'Z29', feekes: '3' },
  { code: 'Z30', feekes: '4–5' },
  { code: 'Z31', feekes: '6' },
  { code: 'Z32', feekes: '7' },
  { code: 'Z37', feekes: '8' },
  { code: 'Z39', feekes: '9' },
  { code: 'Z45', feekes: '10' },
  { code: 'Z49', feekes: '10' },
  { code: 'Z51', feekes: '10.1' },
  { code: 'Z55', feekes: '10.3' },
  { code: 'Z59', feekes: '10.5' },
  { code: 'Z61', feekes: '10.5.1' },
] as const;

export type StageCode = (typeof STAGES)[number]['code'];
