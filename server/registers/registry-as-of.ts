import type { RegistryChange } from '../registry/public';
import type { FieldWithPlanting, RegisterRanchInput } from './inputs-db';

/*
 * Past years are protected (README, "Credit registers"): a register reads the registry as it stood
 * at its cut-off, not as it is today. The cut-off is the moment the ranch's latest finalised
 * version of that year read the registry; before any version, the end of the reporting year
 * (31 December, UTC) once that has passed; a draft of a year not yet over reads it live. An
 * amendment "with today's registry" is how a later correction enters, on purpose, with its diff.
 */

/** The last moment of a reporting year. */
export const endOfYear = (year: number) => `${year}-12-31T23:59:59.999Z`;

/** The cut-off for one ranch's register, or null to read the registry as it is now. */
export function registryCutoff(year: number, latest: { registryAsOf?: string; finalisedAt: string } | null, now: string): string | null {
  if (latest) return latest.registryAsOf ?? latest.finalisedAt;
  return now > endOfYear(year) ? endOfYear(year) : null;
}

export interface RegistryState {
  ranches: RegisterRanchInput[];
  fields: FieldWithPlanting[];
}

type Snapshot = Record<string, unknown>;
const str = (v: unknown) => (v == null ? null : String(v));

/**
 * The registry of one season as it stood before `changes` (newest first, from the change history):
 * each change is undone in turn, so every ranch, field and planting ends as its `before` of its
 * earliest later change (absent when that change created it). Pure.
 */
export function rewindRegistry(current: RegistryState, season: string, changes: RegistryChange[]): RegistryState {
  const ranches = new Map(current.ranches.map((r) => [r.id, r]));
  const fields = new Map(current.fields.map((f) => [f.fieldId, { ranchId: f.ranchId, name: f.fieldName, areaHa: f.areaHa }]));
  const plantings = new Map<string, Omit<FieldWithPlanting, 'ranchId' | 'ranchName' | 'fieldName' | 'areaHa'>>();
  for (const f of current.fields) {
    if (f.plantingId) {
      plantings.set(f.plantingId, { fieldId: f.fieldId, plantingId: f.plantingId, crop: f.crop, variety: f.variety, seededOn: f.seededOn, plannedTerminationOn: f.plannedTerminationOn, terminatedOn: f.terminatedOn });
    }
  }
  for (const c of changes) {
    const b = c.before as Snapshot | null;
    if (c.entityType === 'ranch') {
      if (!b) ranches.delete(c.entityId);
      else {
        const emails = Array.isArray(b.contactEmails) ? (b.contactEmails as string[]) : [];
        ranches.set(c.entityId, { id: c.entityId, name: String(b.name), code: str(b.code), county: str(b.county), contactEmails: emails });
      }
    } else if (c.entityType === 'field') {
      if (!b) fields.delete(c.entityId);
      else fields.set(c.entityId, { ranchId: String(b.ranchId), name: String(b.name), areaHa: Number(b.areaHa) });
    } else if (c.entityType === 'planting') {
      // A planting of another season then is no planting of this register.
      if (!b || b.season !== season) plantings.delete(c.entityId);
      else {
        plantings.set(c.entityId, {
          fieldId: String(b.fieldId),
          plantingId: c.entityId,
          crop: str(b.crop),
          variety: str(b.variety),
          seededOn: str(b.seededOn),
          plannedTerminationOn: str(b.plannedTerminationOn),
          terminatedOn: str(b.terminatedOn),
        });
      }
    }
  }
  const plantingOf = new Map([...plantings.values()].map((p) => [p.fieldId, p]));
  const byText = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);
  const rows: FieldWithPlanting[] = [...fields.entries()].flatMap(([fieldId, f]) => {
    const ranch = ranches.get(f.ranchId);
    if (!ranch) return [];
    const p = plantingOf.get(fieldId);
    return [{
      ranchId: f.ranchId,
      ranchName: ranch.name,
      fieldId,
      fieldName: f.name,
      areaHa: f.areaHa,
      plantingId: p?.plantingId ?? null,
      crop: p?.crop ?? null,
      variety: p?.variety ?? null,
      seededOn: p?.seededOn ?? null,
      plannedTerminationOn: p?.plannedTerminationOn ?? null,
      terminatedOn: p?.terminatedOn ?? null,
    }];
  });
  rows.sort((a, b) => byText(a.ranchName, b.ranchName) || byText(a.fieldName, b.fieldName) || byText(a.fieldId, b.fieldId));
  return { ranches: [...ranches.values()], fields: rows };
}
