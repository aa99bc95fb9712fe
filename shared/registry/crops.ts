import type { CropClass } from '../calc/rules';

/** How each crop code of the crop list reads on screens and paper (English). */
export const CROP_LABELS: Record<CropClass, string> = {
  cereal_rye: 'Cereal rye',
  triticale: 'Triticale',
  barley: 'Barley',
  oats: 'Oats',
  wheat: 'Wheat',
  legume: 'Legume',
  mix: 'Mix',
  other: 'Other',
};

/** The name a person reads for a crop code; a code not on the list is shown as it is. */
export const cropName = (code: string): string => (CROP_LABELS as Record<string, string>)[code] ?? code;
