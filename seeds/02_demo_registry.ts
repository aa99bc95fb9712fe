import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import { acToHa, lbPerAcToKgPerHa } from '../shared/calc/units';
import type { Boundary } from '../shared/registry/boundary';
import { boundaryAreaHa } from '../shared/registry/boundary-area';
import { addDaysIso, seasonOfDate, seasonStartYear, seasonStarting, todayIso } from '../shared/registry/season';
import { demoOrganisationId } from './demo-people';
import { DEMO_RANCHES, type DemoField } from './demo-registry';

/** Stable ids from names, so running the seed twice finds the same rows. */
function demoId(...parts: string[]): string {
  const h = createHash('sha256').update(parts.join('|')).digest('hex');
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-4${h.slice(13, 16)}-8${h.slice(17, 20)}-${h.slice(20, 32)}`;
}

/** A quadrilateral of the given area near `origin`, `widthM` wide, its top edge shifted by `skew`. */
function drawBoundary(origin: [number, number], offsetM: number, areaHa: number, widthM: number, skew = 0): Boundary {
  const heightM = (areaHa * 10_000) / widthM;
  const [lon0, lat0] = origin;
  const mPerDegLat = 111_320;
  const mPerDegLon = 111_320 * Math.cos((lat0 * Math.PI) / 180);
  const x = (m: number) => lon0 + (offsetM + m) / mPerDegLon;
  const y = (m: number) => lat0 + m / mPerDegLat;
  const shift = skew * widthM;
  const corners: [number, number][] = [
    [x(0), y(0)],
    [x(widthM), y(0)],
    [x(widthM + shift), y(heightM)],
    [x(shift), y(heightM)],
    [x(0), y(0)],
  ];
  const ring = corners.map(([a, b]) => [Math.round(a * 1e7) / 1e7, Math.round(b * 1e7) / 1e7]);
  return { type: 'Polygon', coordinates: [ring] };
}

const minDate = (a: string, b: string) => (a < b ? a : b);

export async function seedDemoRegistry(db: Knex, today = todayIso()): Promise<void> {
  const now = new Date().toISOString();
  const current = seasonStartYear(seasonOfDate(today));
  await db.transaction(async (trx) => {
    for (const [orgIndex, ranches] of DEMO_RANCHES.entries()) {
      const orgId = demoOrganisationId(orgIndex);
      for (const ranch of ranches) {
        const ranchId = demoId(orgId, ranch.name);
        await trx('ranches')
          .insert({ id: ranchId, organisation_id: orgId, name: ranch.name, code: ranch.code, county: ranch.county, contact_emails: ranch.contactEmails.join(',') || null, notes: 'Invented demo ranch.', created_at: now, updated_at: now })
          .onConflict('id')
          .ignore();
        let offset = 0;
        for (const [i, f] of ranch.fields.entries()) {
          const fieldId = demoId(orgId, ranch.name, f.name);
          const areaHa = acToHa(f.areaAc);
          const boundary = f.boundary ? drawBoundary(ranch.origin, offset, areaHa * (i % 3 === 2 ? 1.04 : 0.98), f.boundary.widthM, f.boundary.skew) : null;
          offset += (f.boundary?.widthM ?? 200) + 40;
          await trx('fields')
            .insert({
              id: fieldId,
              organisation_id: orgId,
              ranch_id: ranchId,
              name: f.name,
              area_ha: areaHa,
              boundary: boundary ? JSON.stringify(boundary) : null,
              boundary_area_ha: boundary ? boundaryAreaHa(boundary) : null,
              notes: f.now === 'fallow' ? 'Bare fallow this winter.' : null,
              created_at: now,
              updated_at: now,
            })
            .onConflict('id')
            .ignore();
          for (const [seasonYear, crop] of [[current - 1, f.before], [current, f.now]] as const) {
            if (crop === 'fallow') continue;
            await trx('plantings').insert(demoPlanting(orgId, fieldId, f, crop, seasonYear, i, today, now)).onConflict('id').ignore();
          }
        }
      }
    }
  });
}

/** Seeded in October or November of the season; last season's crops were terminated in late winter. */
function demoPlanting(orgId: string, fieldId: string, f: DemoField, crop: string, year: number, i: number, today: string, now: string) {
  const season = seasonStarting(year);
  const seededOn = minDate(addDaysIso(`${year}-10-01`, (i * 5) % 50), today);
  const past = year < seasonStartYear(seasonOfDate(today));
  const terminatedOn = past
    ? addDaysIso(`${year + 1}-02-20`, (i * 3) % 30)
    : f.terminatedDaysAgo != null
      ? addDaysIso(today, -f.terminatedDaysAgo)
      : null;
  return {
    id: demoId(fieldId, season),
    organisation_id: orgId,
    field_id: fieldId,
    season,
    crop,
    variety: crop === f.now ? (f.variety ?? null) : null,
    seeded_on: seededOn,
    seeding_rate_kg_ha: crop === 'legume' || crop === 'mix' ? lbPerAcToKgPerHa(60) : lbPerAcToKgPerHa(90 + (i % 4) * 10),
    planned_termination_on: past ? null : `${year + 1}-03-${String(1 + (i % 20)).padStart(2, '0')}`,
    terminated_on: terminatedOn && terminatedOn < seededOn ? seededOn : terminatedOn,
    notes: null,
    created_at: now,
    updated_at: now,
  };
}
