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
