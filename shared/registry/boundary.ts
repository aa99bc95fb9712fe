import { z } from 'zod';

/**
 * A field boundary: a GeoJSON Polygon or MultiPolygon in WGS84 longitude/latitude (RFC 7946).
 * Checked enough that area and walk-plan computations cannot be fed nonsense.
 */
const position = z
  .array(z.number().finite())
  .min(2, 'A position needs longitude and latitude.')
  .max(3)
  .refine(([lon, lat]) => lon >= -180 && lon <= 180 && lat >= -90 && lat <= 90, 'Longitude must be within ±180 and latitude within ±90.');

const ring = z
  .array(position)
  .min(4, 'A ring needs at least four positions (the first repeated at the end).')
  .max(20_000)
  .refine((r) => r[0][0] === r[r.length - 1][0] && r[0][1] === r[r.length - 1][1], 'A ring must end where it starts.');

const polygonCoordinates = z.array(ring).min(1, 'A polygon needs an outer ring.');

export const polygonSchema = z.object({ type: z.literal('Polygon'), coordinates: polygonCoordinates });
export const multiPolygonSchema = z.object({ type: z.literal('MultiPolygon'), coordinates: z.array(polygonCoordinates).min(1) });

export const boundarySchema = z.discriminatedUnion('type', [polygonSchema, multiPolygonSchema], {
  message: 'The boundary must be a GeoJSON Polygon or MultiPolygon.',
});
export type Boundary = z.infer<typeof boundarySchema>;

/**
 * Accepts what people upload: a bare geometry, a Feature, or a FeatureCollection holding one
 * polygon feature. Returns the geometry or a plain-words problem.
 */
export function boundaryFromGeoJson(input: unknown): { ok: true; boundary: Boundary } | { ok: false; problem: string } {
  let geometry = input as { type?: string; geometry?: unknown; features?: { geometry?: unknown }[] } | null;
  if (geometry?.type === 'FeatureCollection') {
    const features = (geometry.features ?? []).filter((f) => f && f.geometry);
    if (features.length !== 1) return { ok: false, problem: `The file holds ${features.length} shapes; upload one field at a time.` };
    geometry = features[0].geometry as typeof geometry;
  } else if (geometry?.type === 'Feature') {
    geometry = geometry.geometry as typeof geometry;
  }
  const parsed = boundarySchema.safeParse(geometry);
  if (!parsed.success) return { ok: false, problem: parsed.error.issues[0]?.message ?? 'Not a GeoJSON polygon.' };
  return { ok: true, boundary: parsed.data };
}
