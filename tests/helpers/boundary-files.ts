import JSZip from 'jszip';

/**
 * Boundary files made by the tests from GeoJSON twins: KML, KMZ and zipped shapefiles. No
 * shapefile writer is installed, so the .shp/.shx/.dbf are written here byte by byte from the
 * format's published description ("ESRI Shapefile Technical Description", ESRI, July 1998; dBase III
 * table header as that document references it): independent of the reader under test (shpjs).
 */
type Position = number[];
type Ring = Position[];
type Polygon = Ring[];
export interface TwinFeature {
  name: string;
  geometry: { type: 'Polygon'; coordinates: Polygon } | { type: 'MultiPolygon'; coordinates: Polygon[] };
}

const polygonsOf = (g: TwinFeature['geometry']): Polygon[] => (g.type === 'Polygon' ? [g.coordinates] : g.coordinates);

/** A position's longitude/easting and latitude/northing; throws on a position with fewer than two numbers. */
export function xy(p: Position): [number, number] {
  const [x, y] = p;
  if (x === undefined || y === undefined) throw new Error(`a position needs two numbers, got ${JSON.stringify(p)}`);
  return [x, y];
}

// KML 2.2 (OGC 07-147r2): Placemark > Polygon > outerBoundaryIs/innerBoundaryIs > LinearRing.
const coords = (ring: Ring) => ring.map(([x, y]) => `${x},${y},0`).join(' ');
function kmlPolygon([outer, ...holes]: Polygon): string {
  if (!outer) throw new Error('a polygon needs an outer ring');
  return (
    `<Polygon><outerBoundaryIs><LinearRing><coordinates>${coords(outer)}</coordinates></LinearRing></outerBoundaryIs>` +
    holes.map((h) => `<innerBoundaryIs><LinearRing><coordinates>${coords(h)}</coordinates></LinearRing></innerBoundaryIs>`).join('') +
    '</Polygon>'
  );
}

export function kmlOf(features: TwinFeature[], extra = ''): string {
  const placemarks = features.map((f) => {
    const polys = polygonsOf(f.geometry);
    const [one] = polys;
    const geometry = polys.length === 1 && one ? kmlPolygon(one) : `<MultiGeometry>${polys.map((p) => kmlPolygon(p)).join('')}</MultiGeometry>`;
    return `<Placemark><name>${f.name}</name><ExtendedData><Data name="block"><value>B-${f.name}</value></Data></ExtendedData>${geometry}</Placemark>`;
  });
  return `<?xml version="1.0" encoding="UTF-8"?>\n<kml xmlns="http://www.opengis.net/kml/2.2"><Document><name>Invented</name>${placemarks.join('')}${extra}</Document></kml>`;
}

export async function kmzOf(features: TwinFeature[]): Promise<Buffer> {
  const zip = new JSZip();
  zip.file('doc.kml', kmlOf(features));
  return zip.generateAsync({ type: 'nodebuffer', compression: 'DEFLATE' });
}

/** Twice the signed area of a closed ring (shoelace): positive when anticlockwise. */
export function twiceSignedArea(ring: Ring): number {
  let sum = 0;
  let previous: [number, number] | undefined;
  for (const [x, y] of ring.map(xy)) {
    if (previous) sum += previous[0] * y - x * previous[1];
    previous = [x, y];
  }
  return sum;
}
/** The shapefile's own winding: outer rings clockwise, holes anticlockwise (Technical Description, p. 8). */
const wound = (ring: Ring, outer: boolean) => ((twiceSignedArea(ring) < 0) === outer ? ring : [...ring].reverse());

function header(buf: Buffer, fileWords: number, shapeType: number, box: number[]) {
  buf.writeInt32BE(9994, 0); // file code
  buf.writeInt32BE(fileWords, 24); // file length in 16-bit words
  buf.writeInt32LE(1000, 28); // version
  buf.writeInt32LE(shapeType, 32);
  box.forEach((v, i) => buf.writeDoubleLE(v, 36 + 8 * i)); // Xmin, Ymin, Xmax, Ymax; Z and M left 0
}

/**
 * A polygon shapefile (shape type 5) with a NAME column; `project` maps each longitude/latitude
 * to the file's coordinates (identity for a geographic file).
 */
export function shapefileOf(features: TwinFeature[], project: (p: Position) => Position = (p) => p) {
  const records = features.map((f) => {
    const rings = polygonsOf(f.geometry).flatMap((p) => p.map((ring, r) => wound(ring, r === 0).map(project)));
    const points = rings.flat().map(xy);
    const xs = points.map(([x]) => x);
    const ys = points.map(([, y]) => y);
    const box: [number, number, number, number] = [Math.min(...xs), Math.min(...ys), Math.max(...xs), Math.max(...ys)];
    const content = Buffer.alloc(44 + 4 * rings.length + 16 * points.length);
    content.writeInt32LE(5, 0);
    box.forEach((v, i) => content.writeDoubleLE(v, 4 + 8 * i));
    content.writeInt32LE(rings.length, 36);
    content.writeInt32LE(points.length, 40);
    let start = 0;
    rings.forEach((ring, i) => {
      content.writeInt32LE(start, 44 + 4 * i);
      start += ring.length;
    });
    points.forEach(([x, y], i) => {
      content.writeDoubleLE(x, 44 + 4 * rings.length + 16 * i);
      content.writeDoubleLE(y, 44 + 4 * rings.length + 16 * i + 8);
    });
    return { content, box };
  });
  const boxes = records.map((r) => r.box);
  const box = [
    Math.min(...boxes.map((b) => b[0])),
    Math.min(...boxes.map((b) => b[1])),
    Math.max(...boxes.map((b) => b[2])),
    Math.max(...boxes.map((b) => b[3])),
  ];
  const shpLength = 100 + records.reduce((s, r) => s + 8 + r.content.length, 0);
  const shp = Buffer.alloc(shpLength);
  const shx = Buffer.alloc(100 + 8 * records.length);
  header(shp, shpLength / 2, 5, box);
  header(shx, shx.length / 2, 5, box);
  let offset = 100;
  records.forEach((r, i) => {
    shp.writeInt32BE(i + 1, offset); // record number, from 1
    shp.writeInt32BE(r.content.length / 2, offset + 4);
    r.content.copy(shp, offset + 8);
    shx.writeInt32BE(offset / 2, 100 + 8 * i);
    shx.writeInt32BE(r.content.length / 2, 104 + 8 * i);
    offset += 8 + r.content.length;
  });
  return { shp, shx, dbf: dbfOf(features.map((f) => f.name)) };
}

/** A dBase III table with one character column, NAME, 40 wide. */
function dbfOf(names: string[]): Buffer {
  const width = 40;
  const headerLength = 32 + 32 + 1;
  const recordLength = 1 + width;
  const buf = Buffer.alloc(headerLength + recordLength * names.length + 1, 0);
  buf.writeUInt8(0x03, 0);
  buf.writeUInt8(126, 1); // last update: 2026-12-02 (year - 1900)
  buf.writeUInt8(12, 2);
  buf.writeUInt8(2, 3);
  buf.writeUInt32LE(names.length, 4);
  buf.writeUInt16LE(headerLength, 8);
  buf.writeUInt16LE(recordLength, 10);
  buf.write('NAME', 32, 'latin1');
  buf.write('C', 32 + 11, 'latin1');
  buf.writeUInt8(width, 32 + 16);
  buf.writeUInt8(0x0d, 64);
  names.forEach((n, i) => {
    const at = headerLength + recordLength * i;
    buf.write(' ', at, 'latin1');
    buf.write(n.padEnd(width, ' ').slice(0, width), at + 1, 'latin1');
  });
  buf.writeUInt8(0x1a, buf.length - 1);
  return buf;
}

export const WGS84_PRJ =
  'GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137.0,298.257223563]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]]';
export const UTM10N_PRJ =
  'PROJCS["WGS_1984_UTM_Zone_10N",GEOGCS["GCS_WGS_1984",DATUM["D_WGS_1984",SPHEROID["WGS_1984",6378137.0,298.257223563]],PRIMEM["Greenwich",0.0],UNIT["Degree",0.0174532925199433]],PROJECTION["Transverse_Mercator"],PARAMETER["False_Easting",500000.0],PARAMETER["False_Northing",0.0],PARAMETER["Central_Meridian",-123.0],PARAMETER["Scale_Factor",0.9996],PARAMETER["Latitude_Of_Origin",0.0],UNIT["Meter",1.0]]';

export async function zipOf(files: Record<string, Buffer | string>): Promise<Buffer> {
  const zip = new JSZip();
  for (const [name, data] of Object.entries(files)) zip.file(name, data);
  return zip.generateAsync({ type: 'nodebuffer', compression: 'DEFLATE' });
}

/**
 * WGS84 longitude/latitude → UTM easting/northing (northern hemisphere), by the Krüger series to
 * third order in n as given in C. F. F. Karney, "Transverse Mercator with an accuracy of a few
 * nanometers", J. Geodesy 85 (2011), eqs. (7), (9)-(11), (35) (the form quoted in the Wikipedia
 * article "Universal Transverse Mercator coordinate system"); better than a millimetre within a zone.
 */
export function utmNorth(lon0: number) {
  const a = 6378137;
  const f = 1 / 298.257223563;
  const n = f / (2 - f);
  const A = (a / (1 + n)) * (1 + n ** 2 / 4 + n ** 4 / 64);
  const alpha = [n / 2 - (2 / 3) * n ** 2 + (5 / 16) * n ** 3, (13 / 48) * n ** 2 - (3 / 5) * n ** 3, (61 / 240) * n ** 3];
  const k0 = 0.9996;
  const e = (2 * Math.sqrt(n)) / (1 + n);
  const rad = Math.PI / 180;
  return (p: Position): [number, number] => {
    const [lon, lat] = xy(p);
    const phi = lat * rad;
    const dl = (lon - lon0) * rad;
    const t = Math.sinh(Math.atanh(Math.sin(phi)) - e * Math.atanh(e * Math.sin(phi)));
    const xi = Math.atan(t / Math.cos(dl));
    const eta = Math.atanh(Math.sin(dl) / Math.sqrt(1 + t * t));
    let E = eta;
    let N = xi;
    alpha.forEach((al, j) => {
      E += al * Math.cos(2 * (j + 1) * xi) * Math.sinh(2 * (j + 1) * eta);
      N += al * Math.sin(2 * (j + 1) * xi) * Math.cosh(2 * (j + 1) * eta);
    });
    return [500_000 + k0 * A * E, k0 * A * N];
  };
}
