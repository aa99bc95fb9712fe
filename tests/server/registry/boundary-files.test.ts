import { readFileSync } from 'node:fs';
import path from 'node:path';
import geodesic from 'geographiclib-geodesic';
import { describe, expect, it } from 'vitest';
import { MAX_UNZIPPED_BYTES, readBoundaryFile, type BoundaryFileResult } from '../../../server/registry/boundary-files';
import { kmlOf, kmzOf, shapefileOf, twiceSignedArea, utmNorth, UTM10N_PRJ, WGS84_PRJ, xy, zipOf, type TwinFeature } from '../../helpers/boundary-files';
import { at, only } from '../../helpers/lists';

// GeoJSON twins: the invented outlines in the open Pacific near 36° N, 125° W (tests/fixtures/boundaries/make.mjs).
const twin = (name: string): TwinFeature => {
  const fc = JSON.parse(readFileSync(path.join(__dirname, '../../fixtures/boundaries', `${name}.geojson`), 'utf8'));
  const field = fc.features.find((f: { properties: { role: string } }) => f.properties.role === 'field');
  return { name, geometry: field.geometry };
};
const TWINS = ['rectangle', 'ell', 'hole', 'two-part'].map(twin);

type Ring = number[][];
/** A ring written from its smallest corner, anticlockwise for outer rings and clockwise for holes (RFC 7946). */
function canonical(ring: Ring, outer: boolean): string {
  const open = ring.slice(0, -1).map(xy);
  const oriented = (twiceSignedArea(ring) > 0) === outer ? open : open.reverse();
  // The first of the smallest corners (by x, then y): the sort is stable, so ties keep their order.
  const [smallest] = [...oriented].sort((p, q) => p[0] - q[0] || p[1] - q[1]);
  const start = smallest ? oriented.indexOf(smallest) : 0;
  return JSON.stringify([...oriented.slice(start), ...oriented.slice(0, start)]);
}
const polygonsOf = (g: { type: string; coordinates: unknown }) => (g.type === 'Polygon' ? [g.coordinates as Ring[]] : (g.coordinates as Ring[][]));
const canonicalShape = (g: { type: string; coordinates: unknown }) => polygonsOf(g).map((p) => p.map((r, i) => canonical(r, i === 0)));

function shapesOf(result: BoundaryFileResult) {
  if (!result.ok) throw new Error(result.problem);
  return result.shapes;
}

describe('boundary files import to the same polygon as their GeoJSON twin', () => {
  it('reads KML (a Polygon, a hole, a MultiGeometry) with names and extended data', async () => {
    const result = await readBoundaryFile('fields.kml', Buffer.from(kmlOf(TWINS)));
    expect(result.ok && result.format).toBe('kml');
    const shapes = shapesOf(result);
    expect(shapes.map((s) => s.properties.name)).toEqual(TWINS.map((t) => t.name));
    expect(at(shapes, 0).properties.block).toBe('B-rectangle');
    expect(shapes.map((s) => s.problem)).toEqual(TWINS.map(() => null));
    expect(shapes.map((s) => canonicalShape(s.boundary!))).toEqual(TWINS.map((t) => canonicalShape(t.geometry)));
    expect(at(shapes, 3).boundary?.type).toBe('MultiPolygon');
    expect(result.ok && result.nameKeys[0]).toBe('name');
  });

  it('reads KMZ (zipped KML)', async () => {
    const result = await readBoundaryFile('fields.kmz', await kmzOf(TWINS));
    expect(result.ok && result.format).toBe('kmz');
    expect(shapesOf(result).map((s) => canonicalShape(s.boundary!))).toEqual(TWINS.map((t) => canonicalShape(t.geometry)));
  });

  it('reads a zipped shapefile in WGS84 (outer rings clockwise in the file) with its .dbf names', async () => {
    const { shp, shx, dbf } = shapefileOf(TWINS);
    const result = await readBoundaryFile('fields.zip', await zipOf({ 'fields.shp': shp, 'fields.shx': shx, 'fields.dbf': dbf, 'fields.prj': WGS84_PRJ }));
    expect(result.ok && result.format).toBe('shapefile');
    const shapes = shapesOf(result);
    expect(shapes.map((s) => s.properties.NAME)).toEqual(TWINS.map((t) => t.name));
    // Written as doubles, read back through the WGS84 .prj and kept to the nanodegree: exact.
    expect(shapes.map((s) => canonicalShape(s.boundary!))).toEqual(TWINS.map((t) => canonicalShape(t.geometry)));
  });

  it('the twins keep RFC 7946 winding whatever the file had', async () => {
    const { shp, dbf } = shapefileOf([twin('hole')]);
    const s = only(shapesOf(await readBoundaryFile('pond.zip', await zipOf({ 'pond.shp': shp, 'pond.dbf': dbf }))));
    const rings = (s.boundary as { coordinates: Ring[] }).coordinates;
    expect(rings).toHaveLength(2);
    expect(twiceSignedArea(at(rings, 0))).toBeGreaterThan(0); // outer: anticlockwise
    expect(twiceSignedArea(at(rings, 1))).toBeLessThan(0); // hole: clockwise
  });
});

describe('a projected shapefile is reprojected to WGS84 through its .prj', () => {
  const toUtm = utmNorth(-123);

  it('the test projection agrees with geographiclib on the central meridian (northing = 0.9996 × meridian arc)', () => {
    // Independent check of the Krüger series in the helper: geographiclib's geodesic along the meridian (Karney 2013).
    const arc = geodesic.Geodesic.WGS84.Inverse(0, -123, 36, -123).s12!;
    const [e, n] = toUtm([-123, 36]);
    expect(e).toBeCloseTo(500_000, 6);
    expect(Math.abs(n - 0.9996 * arc)).toBeLessThan(0.001);
  });

  it('UTM zone 10N coordinates come back within 1 cm of the GeoJSON twin', async () => {
    const twins = [twin('rectangle'), twin('ell')];
    const { shp, dbf } = shapefileOf(twins, toUtm);
    // The file really is in metres: eastings near 320 km, northings near 3,985 km.
    expect(shp.readDoubleLE(36)).toBeGreaterThan(300_000);
    const shapes = shapesOf(await readBoundaryFile('utm.zip', await zipOf({ 'utm.shp': shp, 'utm.dbf': dbf, 'utm.prj': UTM10N_PRJ })));
    let worst = 0;
    expect(shapes).toHaveLength(twins.length);
    shapes.forEach((s, i) => {
      const got = polygonsOf(s.boundary!).flat(2).map(xy);
      const want = polygonsOf(at(twins, i).geometry).flat(2).map(xy);
      // Same corners in some order and winding: compare each corner to its nearest twin corner, in metres (geographiclib).
      for (const [lon, lat] of got) {
        const d = Math.min(...want.map(([x, y]) => geodesic.Geodesic.WGS84.Inverse(lat, lon, y, x).s12!));
        worst = Math.max(worst, d);
      }
      expect(got.length).toBe(want.length);
      expect(s.areaHa!).toBeCloseTo(i === 0 ? 10 : 12.75, 1); // 400 × 250 m; 450 × 200 + 150 × 250 m
    });
    expect(worst).toBeLessThan(0.01);
  });

  it('refuses projected coordinates without a .prj, or with a .prj it cannot use, in plain words', async () => {
    const { shp, dbf } = shapefileOf([twin('rectangle')], toUtm);
    const none = await readBoundaryFile('utm.zip', await zipOf({ 'utm.shp': shp, 'utm.dbf': dbf }));
    expect(none.ok).toBe(false);
    expect(!none.ok && none.problem).toMatch(/no \.prj file/);
    const odd = await readBoundaryFile('utm.zip', await zipOf({ 'utm.shp': shp, 'utm.dbf': dbf, 'utm.prj': 'PROJCS["nonsense"]' }));
    expect(!odd.ok && odd.problem).toMatch(/could not be converted/);
  });
});

describe('refusals', () => {
  const bowtie = { name: 'Bowtie', geometry: { type: 'Polygon' as const, coordinates: [[[-125, 36], [-124.99, 36.01], [-124.99, 36], [-125, 36.01], [-125, 36]]] } };

  it('a self-intersecting shape is refused with the validity check’s words, the others stay usable', async () => {
    const shapes = shapesOf(await readBoundaryFile('mixed.kml', Buffer.from(kmlOf([twin('rectangle'), bowtie]))));
    expect(shapes).toHaveLength(2);
    expect(at(shapes, 0).problem).toBeNull();
    expect(at(shapes, 1).boundary).toBeNull();
    expect(at(shapes, 1).problem).toMatch(/crosses itself/);
  });

  it('bounds the corners of one shape', async () => {
    const ring = Array.from({ length: 6000 }, (_, i) => [-125 + 0.01 * Math.cos((2 * Math.PI * i) / 6000), 36 + 0.01 * Math.sin((2 * Math.PI * i) / 6000)]);
    const many = { name: 'Round', geometry: { type: 'Polygon' as const, coordinates: [[...ring, at(ring, 0)]] } };
    const s = only(shapesOf(await readBoundaryFile('round.kml', Buffer.from(kmlOf([many])))));
    expect(s.problem).toMatch(/6,000 corners; at most 5,000/);
  });

  it('stops unzipping beyond the bound (a zip bomb)', async () => {
    const bomb = await zipOf({ 'doc.kml': Buffer.alloc(MAX_UNZIPPED_BYTES + 1024, 0x20) });
    expect(bomb.length).toBeLessThan(100_000);
    const result = await readBoundaryFile('bomb.kmz', bomb);
    expect(!result.ok && result.problem).toMatch(/unpacks to more than 10 MB/);
  });

  it('refuses files that are not boundaries, in plain words', async () => {
    const cases: [string, Buffer | string, RegExp][] = [
      ['notes.txt', 'hello', /not GeoJSON, KML, KMZ or a zipped shapefile/],
      ['field.shp', shapefileOf([twin('rectangle')]).shp, /zip the \.shp, \.dbf and \.prj together/],
      ['points.kml', '<kml xmlns="http://www.opengis.net/kml/2.2"><Placemark><Point><coordinates>-125,36</coordinates></Point></Placemark></kml>', /no areas/],
      ['entity.kml', '<!DOCTYPE kml [<!ENTITY x "y">]><kml/>', /entities/],
      ['empty.zip', await zipOf({ 'readme.txt': 'x' }), /no shapefile/],
    ];
    for (const [name, content, problem] of cases) {
      const result = await readBoundaryFile(name, Buffer.isBuffer(content) ? content : Buffer.from(content));
      expect(result.ok, name).toBe(false);
      expect(!result.ok && result.problem, name).toMatch(problem);
    }
  });
});
