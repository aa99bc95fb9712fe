import type { Boundary } from './boundary';
import { lonLatOf } from '../geo/plane';

export interface Outline {
  width: number;
  height: number;
  /** One SVG path per polygon (outer ring and holes, even-odd filled). */
  paths: string[];
  /** Projects a WGS84 point into the drawing, for stops and "you are here". */
  project: (lon: number, lat: number) => [number, number];
}

/**
 * A field outline for a small SVG drawing: an equirectangular projection around the field's
 * middle latitude (true to shape at field scale), fitted into width × height with a margin.
 * No map tiles are needed, so it works offline and prints.
 */
export function boundaryOutline(boundary: Boundary, size = { width: 240, height: 180, margin: 8 }): Outline {
  const polygons = boundary.type === 'Polygon' ? [boundary.coordinates] : boundary.coordinates;
  let minLon = Infinity, maxLon = -Infinity, minLat = Infinity, maxLat = -Infinity;
  for (const poly of polygons) {
    for (const ring of poly) {
      for (const [lon, lat] of ring.map(lonLatOf)) {
        minLon = Math.min(minLon, lon);
        maxLon = Math.max(maxLon, lon);
        minLat = Math.min(minLat, lat);
        maxLat = Math.max(maxLat, lat);
      }
    }
  }
  const kx = Math.cos((((minLat + maxLat) / 2) * Math.PI) / 180);
  const spanX = Math.max((maxLon - minLon) * kx, 1e-9);
  const spanY = Math.max(maxLat - minLat, 1e-9);
  const inner = { w: size.width - 2 * size.margin, h: size.height - 2 * size.margin };
  const scale = Math.min(inner.w / spanX, inner.h / spanY);
  const offX = size.margin + (inner.w - spanX * scale) / 2;
  const offY = size.margin + (inner.h - spanY * scale) / 2;
  const project = (lon: number, lat: number): [number, number] => [
    round(offX + (lon - minLon) * kx * scale),
    round(offY + (maxLat - lat) * scale),
  ];
  const paths = polygons.map((poly) =>
    poly
      .map((ring) => ring.map(lonLatOf).map(([lon, lat], i) => `${i ? 'L' : 'M'}${project(lon, lat).join(' ')}`).join(' ') + ' Z')
      .join(' '),
  );
  return { width: size.width, height: size.height, paths, project };
}

const round = (v: number) => Math.round(v * 10) / 10;
