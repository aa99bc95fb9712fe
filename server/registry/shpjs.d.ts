// shpjs ships no types: the subset the boundary upload uses (server/registry/boundary-files.ts).
declare module 'shpjs' {
  import type { FeatureCollection, Geometry } from 'geojson';
  /** Reads a .shp; with a .prj's text, reprojects every coordinate to WGS84 (proj4). */
  export function parseShp(shp: ArrayBuffer | ArrayBufferView, prj?: string): (Geometry | null)[];
  /** Reads a .dbf's rows; the .cpg's text names its encoding. */
  export function parseDbf(dbf: ArrayBuffer | ArrayBufferView, cpg?: string): Record<string, unknown>[];
  export function combine(parts: [(Geometry | null)[], Record<string, unknown>[]?]): FeatureCollection;
}
