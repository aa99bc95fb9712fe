import type { Boundary } from '../../shared/registry/boundary';
import { readBoundaryFile, shapeLabel } from './boundary-files';
import type { BoundaryUploads, KeptShapes } from './boundary-uploads';

/** Office form names of the shared schemas' fields, so errors sit beside the right input. */
export const FORM_NAME_OF: Record<string, string> = { areaHa: 'area', seedingRateKgHa: 'seedingRate' };

export function renameErrors(fields: Record<string, string> | undefined): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(fields ?? {})) {
    const top = k.split('.')[0]!;
    out[FORM_NAME_OF[top] ?? top] ??= v;
  }
  return out;
}

export interface BoundaryChoice {
  boundary?: Boundary | null;
  problem?: string;
  /** A file with several shapes, shown again as a list to pick from. */
  choose?: KeptShapes;
  /** True until one of them is picked: nothing is saved yet. */
  pending?: boolean;
}

/**
 * The boundary the field form asks for: a new file (GeoJSON, KML, KMZ or a zipped shapefile, read
 * by boundary-files.ts), a pick among the shapes of a file uploaded before, removal, or nothing.
 */
export async function boundaryFromForm(
  uploads: BoundaryUploads,
  organisationId: string,
  file: Express.Multer.File | undefined,
  body: Record<string, unknown>,
): Promise<BoundaryChoice> {
  if (file && file.size > 0) {
    const read = await readBoundaryFile(file.originalname ?? '', file.buffer);
    if (!read.ok) return { problem: read.problem };
    const [only, ...others] = read.shapes;
    if (only && others.length === 0) return only.problem ? { problem: only.problem } : { boundary: only.boundary };
    const { ok: _ok, ...rest } = read;
    return { pending: true, choose: await uploads.keep({ organisationId, fileName: String(file.originalname ?? '').slice(0, 200), ...rest }) };
  }
  if (body.boundaryUpload) {
    const kept = await uploads.get(organisationId, body.boundaryUpload);
    if (!kept) return { problem: 'The file uploaded before is no longer kept; upload it again.' };
    const pick = Number(body.boundaryPick);
    const shape = body.boundaryPick !== undefined && Number.isInteger(pick) ? kept.shapes[pick] : undefined;
    if (!shape) return { pending: true, choose: kept, problem: 'Choose one of the shapes from the file, or upload another file.' };
    if (shape.problem) return { pending: true, choose: kept, problem: `${shapeLabel(shape, kept.nameKeys[0])}: ${shape.problem}` };
    return { boundary: shape.boundary, choose: kept };
  }
  if (body.removeBoundary === 'yes') return { boundary: null };
  return {};
}
