import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createTestApp, type TestApp } from '../../helpers/app';
import { seedDemoHistory } from '../../../seeds/06_demo_history';
import { DEMO_RANCHES } from '../../../seeds/demo-registry';
import { todayIso } from '../../../shared/registry/season';

let t: TestApp;
beforeEach(async () => {
  t = await createTestApp();
  await seedDemoHistory(t.db, todayIso());
});
afterEach(async () => {
  await t.close();
});

/*
 * The demo must not sit on anybody's land. Between 34° N and 38.5° N nothing but open Pacific lies
 * west of 130° W until Asia (the North American coast at these latitudes runs east of 124° W; from
 * memory, any atlas). The box below keeps a latitude like the one the demo had and is far
 * offshore: a demo point inside it cannot be a real farm.
 */
const OPEN_SEA = { west: -140, east: -130, south: 34, north: 38.5 };
const atSea = ([lon, lat]: number[]) => lon !== undefined && lat !== undefined && lon >= OPEN_SEA.west && lon <= OPEN_SEA.east && lat >= OPEN_SEA.south && lat <= OPEN_SEA.north;

function vertices(geojson: string): number[][] {
  const g = JSON.parse(geojson) as { type: string; coordinates: unknown };
  const polygons = (g.type === 'MultiPolygon' ? g.coordinates : [g.coordinates]) as number[][][][];
  return polygons.flat(2);
}

describe('demo places', () => {
  it('every ranch origin of the demo registry is in the open sea', () => {
    const origins = DEMO_RANCHES.flat().map((r) => r.origin);
    expect(origins.length).toBeGreaterThan(3);
    expect(origins.filter((o) => !atSea(o))).toEqual([]);
  });

  it('every stored demo boundary vertex and walk GPS point is in the open sea, and the shapes keep their areas', async () => {
    const fields = await t.db('fields').whereNotNull('boundary').select('name', 'boundary', 'area_ha', 'boundary_area_ha');
    expect(fields.length).toBeGreaterThanOrEqual(8);
    for (const f of fields) {
      expect(vertices(f.boundary).filter((v) => !atSea(v)), f.name).toEqual([]);
      // The seed draws each boundary at 98 % or 104 % of the entered area (seeds/02_demo_registry.ts):
      // moving it must not have distorted it beyond that.
      expect(Math.abs(f.boundary_area_ha / f.area_ha - 1), f.name).toBeLessThan(0.06);
    }
    const points = await t.db('walk_plants').whereNotNull('lat').select('lat', 'lon');
    expect(points.filter((p) => !atSea([p.lon, p.lat]))).toEqual([]);
  });
});
