import { boundaryFromGeoJson, type Boundary } from '../../shared/registry/boundary';

/** Office form names of the shared schemas' fields, so errors sit beside the right input. */
export const FORM_NAME_OF: Record<string, string> = { areaHa: 'area', seedingRateKgHa: 'seedingRate' };

export function renameErrors(fields: Record<string, string> | undefined): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(fields ?? {})) {
    const top = k.split('.')[0];
    out[FORM_NAME_OF[top] ?? top] ??= v;
  }
  return out;
}

/** The uploaded GeoJSON file, if any: the geometry, or a problem to show beside the input. */
export function boundaryFromUpload(file: Express.Multer.File | undefined): { boundary?: Boundary; problem?: string } {
  if (!file || file.size === 0) return {};
  let json: unknown;
  try {
    json = JSON.parse(file.buffer.toString('utf8').replace(/^\uFEFF/, ''));
  } catch {
    return { problem: 'The boundary file is not valid GeoJSON (it could not be read as JSON).' };
  }
  const result = boundaryFromGeoJson(json);
  return result.ok ? { boundary: result.boundary } : { problem: result.problem };
}
