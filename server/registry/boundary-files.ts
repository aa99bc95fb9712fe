import type { Readable } from 'node:stream';
import { kml as kmlToGeoJson } from '@tmcw/togeojson';
import { DOMParser } from '@xmldom/xmldom';
import JSZip from 'jszip';
import { parseDbf, parseShp } from 'shpjs';
import { boundaryAreaHa } from '../../shared/registry/boundary-area';
import { formatNumber } from '../../shared/format/figures';
import { boundaryProblemText, boundarySchema, checkBoundary, type Boundary } from '../../shared/registry/boundary';
import { expectDefined } from '../platform/expect-defined';

/**
 * Boundary files as farm offices have them, read into GeoJSON features: GeoJSON, KML, KMZ (zipped
 * KML) and zipped shapefiles (.shp with its .dbf, and its .prj when the coordinates are projected:
 * shpjs reprojects them to WGS84 with proj4). Every polygon feature is checked on its own
 * (`checkBoundary`), so a file with one bad shape among many still lists the others.
 */
export type BoundaryFormat = 'geojson' | 'kml' | 'kmz' | 'shapefile';

export interface UploadedShape {
  /** Position in the file, from 0. */
  index: number;
  /** The feature's attributes as text (KML name and extended data, shapefile .dbf columns, GeoJSON properties). */
  properties: Record<string, string>;
  /** The polygon in WGS84 longitude/latitude, outer rings anticlockwise (RFC 7946); null when refused. */
  boundary: Boundary | null;
  areaHa: number | null;
  /** Why this shape cannot be used, in plain words. */
  problem: string | null;
}

export type BoundaryFileResult =
  | { ok: true; format: BoundaryFormat; shapes: UploadedShape[]; nameKeys: string[]; skipped: number }
  | { ok: false; problem: string };

/** Bounds on what a file may hold: the upload itself is at most 2 MB (multer, pages.ts). */
export const MAX_SHAPES = 500;
export const MAX_UNZIPPED_BYTES = 10 * 1024 * 1024;
export const MAX_FILE_VERTICES = 100_000;

const refuse = (problem: string) => ({ ok: false as const, problem });

export async function readBoundaryFile(fileName: string, buffer: Buffer): Promise<BoundaryFileResult> {
  try {
    if (buffer.length >= 4 && buffer.readUInt32LE(0) === 0x04034b50) return await readZip(buffer);
    const text = buffer.toString('utf8').replace(/^\uFEFF/, '').trimStart();
    if (text.startsWith('<')) return readKml(text, 'kml');
    if (/\.(kml|kmz|zip|shp)$/i.test(fileName) && !text.startsWith('{')) return refuse(unreadable(fileName));
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch {
      return refuse('The boundary file could not be read: it is not GeoJSON, KML, KMZ or a zipped shapefile.');
    }
    return fromFeatures('geojson', geoJsonFeatures(json));
  } catch (err) {
    if (err instanceof FileProblem) return refuse(err.message);
    return refuse(unreadable(fileName));
  }
}

class FileProblem extends Error {}

const unreadable = (fileName: string) =>
  /\.shp$/i.test(fileName)
    ? 'A shapefile is several files: zip the .shp, .dbf and .prj together and upload the .zip.'
    : 'The boundary file could not be read: it is not GeoJSON, KML, KMZ or a zipped shapefile, or it is damaged.';

// Zips: KMZ or a zipped shapefile ---------------------------------------------------------------

/** Unzips the entries wanted, stopping as soon as they inflate beyond the bound (a zip bomb). */
async function unzip(zip: JSZip, names: string[]): Promise<Map<string, Buffer>> {
  const out = new Map<string, Buffer>();
  let total = 0;
  for (const name of names) {
    const stream = zip.file(name)!.nodeStream('nodebuffer') as Readable;
    const chunks: Buffer[] = [];
    await new Promise<void>((resolve, reject) => {
      stream.on('data', (chunk: Buffer) => {
        total += chunk.length;
        if (total > MAX_UNZIPPED_BYTES) {
          stream.pause();
          stream.removeAllListeners('data');
          reject(new FileProblem(`The zip file unpacks to more than ${MAX_UNZIPPED_BYTES / 1024 / 1024} MB; upload only the field boundaries.`));
        } else chunks.push(chunk);
      });
      stream.on('end', () => resolve());
      stream.on('error', reject);
    });
    out.set(name, Buffer.concat(chunks));
  }
  return out;
}

async function readZip(buffer: Buffer): Promise<BoundaryFileResult> {
  const zip = await JSZip.loadAsync(buffer);
  const names = Object.entries(zip.files)
    .filter(([n, entry]) => !entry.dir && !n.startsWith('__MACOSX/'))
    .map(([n]) => n);
  const kml = names.filter((n) => /\.kml$/i.test(n));
  const [firstKml] = kml;
  if (firstKml !== undefined) {
    // A KMZ's main document is doc.kml by convention, else the first .kml at the top.
    const main = kml.find((n) => /(^|\/)doc\.kml$/i.test(n)) ?? firstKml;
    const files = await unzip(zip, [main]);
    return readKml(files.get(main)!.toString('utf8').replace(/^\uFEFF/, ''), 'kmz');
  }
  const shp = names.filter((n) => /\.shp$/i.test(n));
  const [shpName] = shp;
  if (shpName === undefined) return refuse('The zip file holds no shapefile (.shp) and no KML file.');
  if (shp.length > 1) return refuse(`The zip file holds ${shp.length} shapefiles; zip one layer (one .shp with its .dbf and .prj) at a time.`);
  const stem = shpName.slice(0, -4).toLowerCase();
  const sibling = (ext: string) => names.find((n) => n.toLowerCase() === `${stem}.${ext}`);
  const [dbfName, prjName, cpgName] = [sibling('dbf'), sibling('prj'), sibling('cpg')];
  const files = await unzip(zip, [shpName, dbfName, prjName, cpgName].filter((n): n is string => Boolean(n)));
  const prj = prjName ? files.get(prjName)!.toString('utf8').trim() : undefined;
  const geometries = parseShp(files.get(shpName)!, prj);
  const rows = dbfName ? parseDbf(files.get(dbfName)!, cpgName ? files.get(cpgName)!.toString('utf8').trim() : undefined) : [];
  const features = geometries.map((geometry, i) => ({ geometry, properties: rows[i] ?? {} }));
  const result = fromFeatures('shapefile', features);
  if (result.ok && result.shapes.some((s) => s.problem === NOT_LONLAT)) {
    return refuse(
      prj
        ? 'The shapefile’s .prj names a coordinate system that could not be converted to longitude and latitude; export it in WGS 84 and upload it again.'
        : 'The shapefile has no .prj file and its coordinates are not longitude and latitude: zip its .prj with it.',
    );
  }
  return result;
}

// KML ------------------------------------------------------------------------------------------

function readKml(text: string, format: 'kml' | 'kmz'): BoundaryFileResult {
  // Entities are not needed in a boundary file; refusing them rules out entity expansion.
  if (/<!(DOCTYPE|ENTITY)/i.test(text)) return refuse('The KML file declares a document type or entities; export it again without them.');
  const doc = new DOMParser({ onError: () => undefined }).parseFromString(text, 'text/xml');
  if (!doc?.documentElement || doc.getElementsByTagName('parsererror').length) return refuse('The KML file could not be read (it is not well-formed XML).');
  const fc = kmlToGeoJson(doc as unknown as Document);
  return fromFeatures(format, fc.features as RawFeature[]);
}

// GeoJSON and shared steps ------------------------------------------------------------------------

interface RawFeature {
  geometry: unknown;
  properties?: Record<string, unknown> | null;
}

function geoJsonFeatures(json: unknown): RawFeature[] {
  const j = json as { type?: string; features?: unknown; geometry?: unknown; properties?: unknown } | null;
  if (j?.type === 'FeatureCollection') return Array.isArray(j.features) ? (j.features as RawFeature[]).filter((f) => f && typeof f === 'object') : [];
  if (j?.type === 'Feature') return [j as RawFeature];
  return [{ geometry: j, properties: {} }];
}

type Position = number[];
const NOT_LONLAT = 'The coordinates are not longitude and latitude.';

/** Polygons only: a MultiGeometry of polygons (KML) becomes one MultiPolygon; points and lines are skipped. */
function polygonOf(geometry: unknown): unknown {
  const g = geometry as { type?: string; coordinates?: unknown; geometries?: unknown[] } | null;
  if (!g || typeof g !== 'object') return null;
  if (g.type === 'Polygon' || g.type === 'MultiPolygon') return g;
  if (g.type === 'GeometryCollection' && Array.isArray(g.geometries)) {
    const parts = g.geometries.map(polygonOf).filter(Boolean) as { type: string; coordinates: Position[][] | Position[][][] }[];
    if (!parts.length) return null;
    const polys = parts.flatMap((p) => (p.type === 'Polygon' ? [p.coordinates as Position[][]] : (p.coordinates as Position[][][])));
    return polys.length === 1 ? { type: 'Polygon', coordinates: polys[0] } : { type: 'MultiPolygon', coordinates: polys };
  }
  return null;
}

/** Twice the signed area of a ring in degrees (shoelace): positive when anticlockwise. */
function signedArea(ring: [number, number][]): number {
  let s = 0;
  let previous: [number, number] | undefined;
  for (const point of ring) {
    if (previous) s += previous[0] * point[1] - point[0] * previous[1];
    previous = point;
  }
  return s;
}

/** A checked position's longitude and latitude: boundarySchema lets no position through without both. */
const lonLatOf = ([x, y]: Position): [number, number] => [expectDefined(x, 'a checked position’s longitude'), expectDefined(y, 'a checked position’s latitude')];

/** A nanodegree is about 0.1 mm: finer than any survey, and it drops reprojection noise (1e-14°). */
const nano = (v: number) => Math.round(v * 1e9) / 1e9;

/** Two-dimensional positions to the nanodegree, outer rings anticlockwise and holes clockwise (RFC 7946, 3.1.6). */
function normalise(b: Boundary): Boundary {
  const fix = (rings: Position[][]) =>
    rings.map((ring, r) => {
      const flat = ring.map((p): [number, number] => {
        const [x, y] = lonLatOf(p);
        return [nano(x), nano(y)];
      });
      const anticlockwise = signedArea(flat) > 0;
      return (r === 0) === anticlockwise ? flat : flat.reverse();
    });
  return b.type === 'Polygon'
    ? { type: 'Polygon', coordinates: fix(b.coordinates) }
    : { type: 'MultiPolygon', coordinates: b.coordinates.map(fix) };
}

const asText = (v: unknown) => (v == null ? '' : typeof v === 'object' ? JSON.stringify(v) : String(v).trim());

function fromFeatures(format: BoundaryFormat, features: RawFeature[]): BoundaryFileResult {
  const polygons = features.map((f) => ({ f, geometry: polygonOf(f.geometry) })).filter((x) => x.geometry);
  const skipped = features.length - polygons.length;
  if (polygons.length === 0) {
    return refuse(features.length ? 'The file holds no areas (only points or lines): a field boundary must be a polygon.' : 'The file holds no shapes.');
  }
  if (polygons.length > MAX_SHAPES) return refuse(`The file holds ${formatNumber(polygons.length)} shapes; at most ${MAX_SHAPES} are accepted at once.`);
  let vertices = 0;
  const shapes = polygons.map(({ f, geometry }, index): UploadedShape => {
    const properties: Record<string, string> = {};
    for (const [k, v] of Object.entries(f.properties ?? {})) {
      const text = asText(v);
      if (text && !/^(styleUrl|styleHash|styleMapHash|stroke.*|fill.*|icon.*)$/.test(k)) properties[k] = text.slice(0, 200);
    }
    const shape = { index, properties, boundary: null, areaHa: null, problem: null as string | null };
    const parsed = boundarySchema.safeParse(geometry);
    if (!parsed.success) {
      const lonLat = parsed.error.issues.some((i) => /Longitude must be within/.test(i.message));
      return { ...shape, problem: lonLat ? NOT_LONLAT : (parsed.error.issues[0]?.message ?? 'Not a polygon.') };
    }
    const boundary = normalise(parsed.data);
    const valid = checkBoundary(boundary);
    if (!valid.ok) return { ...shape, problem: boundaryProblemText(valid.problem) };
    vertices += (boundary.type === 'Polygon' ? [boundary.coordinates] : boundary.coordinates).flat().reduce((s, r) => s + r.length - 1, 0);
    return { ...shape, boundary, areaHa: boundaryAreaHa(boundary) };
  });
  if (vertices > MAX_FILE_VERTICES) {
    return refuse(`The file's shapes have ${formatNumber(vertices)} corners in all; at most ${formatNumber(MAX_FILE_VERTICES)} are accepted. Simplify the outlines or upload fewer.`);
  }
  const keys = [...new Set(shapes.flatMap((s) => Object.keys(s.properties)))];
  return { ok: true, format, shapes, nameKeys: rankNameKeys(keys, shapes), skipped };
}

/** Attributes that could name a field, likeliest first: "name"-like, then "field"-like, then the rest. */
function rankNameKeys(keys: string[], shapes: UploadedShape[]): string[] {
  const score = (k: string) => (/^name$/i.test(k) ? 0 : /name/i.test(k) ? 1 : /field|block|parcel|label|id/i.test(k) ? 2 : 3);
  const filled = (k: string) => shapes.filter((s) => s.properties[k]).length;
  return keys.sort((a, b) => score(a) - score(b) || filled(b) - filled(a) || a.localeCompare(b));
}

/** The name a shape goes by under one attribute, or "Shape N" without one. */
export function shapeLabel(shape: UploadedShape, nameKey: string | undefined): string {
  return (nameKey && shape.properties[nameKey]) || `Shape ${shape.index + 1}`;
}
