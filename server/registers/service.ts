import { randomUUID } from 'node:crypto';
import { linkOf, sha256Hex, signRegister, verifyRegister, type Keyring, type SignatureState } from './signing';
import type { Knex } from 'knex';
import { HttpError } from '../platform/errors';
import {
  approvedWalksFor,
  fieldsWithPlanting,
  registerRanches,
  type FieldWithPlanting,
  type RegisterRanchInput,
} from './inputs-db';
import {
  getRegister,
  highestRegisterVersion,
  insertRegister,
  isUniqueViolation,
  latestRegistersOfYear,
  type StoredRegister,
} from './db';
import { creditRuleForYear } from '../rules/public';
import { registryChangesAfter } from '../registry/public';
import { registryCutoff, rewindRegistry, type RegistryState } from './registry-as-of';

/*
 * Credit registers (README, "Credit registers"). The register for reporting year Y covers the
 * plantings of season (Y-1)-(Y mod 100), the winter that ends in Y, judged by the credit rule in
 * effect on 1 January of Y. One row per field of the ranch, planted or not.
 */

export * from './rows';
import { assembleRegister, walksByPlanting, seasonOfYear, ruleOfRegister, projectionDateOf, registerRow, type RegisterRow, type FinalSnapshot, type FinalRegister, type Register } from './rows';
import { inTransaction } from '../platform/database';

export interface RegistryChoice {
  /** 'cutoff' (the default): each ranch's registry as it stood at its cut-off (registry-as-of.ts); 'today': as it is now, for an amendment made on purpose. */
  registry?: 'cutoff' | 'today';
  /** The present moment as an ISO time (tests set it). */
  now?: string;
}

/** Each ranch's registry cut-off for the year; a ranch without one reads the registry live. */
async function cutoffsOf(db: Knex, organisationId: string, year: number, ranchIds: string[], now: string): Promise<Map<string, string>> {
  const latest = await latestRegistersOfYear(db, organisationId, year);
  const out = new Map<string, string>();
  for (const id of ranchIds) {
    const version = latest.get(id);
    const final = version ? await getFinalRegister(db, organisationId, version.id) : undefined;
    const cutoff = registryCutoff(year, final ? { registryAsOf: final.registryAsOf, finalisedAt: final.finalisedAt } : null, now);
    if (cutoff) out.set(id, cutoff);
  }
  return out;
}

export interface RegisterInput {
  /** The ranch as it stood at the cut-off (its name may have changed since). */
  ranch: RegisterRanchInput;
  fields: FieldWithPlanting[];
  registryAsOf: string;
}

/**
 * What each ranch's register reads from the registry: its fields and their plantings of the season
 * as they stood at the ranch's cut-off (registry-as-of.ts), or as they are now. `all` says that
 * `ranches` are all of the organisation's, so one query without an id list reads them.
 */
export async function registerInputs(db: Knex, organisationId: string, year: number, ranches: RegisterRanchInput[], choice: RegistryChoice = {}, all = false): Promise<RegisterInput[]> {
  const season = seasonOfYear(year);
  const now = choice.now ?? new Date().toISOString();
  const cutoffs = choice.registry === 'today' ? new Map<string, string>() : await cutoffsOf(db, organisationId, year, ranches.map((r) => r.id), now);
  const asOf = new Map(cutoffs);
  const earliest = [...cutoffs.values()].sort()[0];
  const changes = earliest ? await registryChangesAfter(db, organisationId, earliest) : [];
  // Nothing changed since the earliest cut-off: every ranch reads the registry as it is.
  if (!changes.length) cutoffs.clear();
  const ranchIds = cutoffs.size || all ? undefined : ranches.map((r) => r.id);
  const fields = await fieldsWithPlanting(db, organisationId, { season, ranchIds });
  const stateAt = new Map<string, RegistryState>();
  if (cutoffs.size) {
    const current = { ranches: await registerRanches(db, organisationId), fields };
    for (const c of new Set(cutoffs.values())) stateAt.set(c, rewindRegistry(current, season, changes.filter((x) => x.at > c)));
  }
  const group = (list: FieldWithPlanting[]) => {
    const out = new Map<string, FieldWithPlanting[]>();
    for (const f of list) (out.get(f.ranchId) ?? out.set(f.ranchId, []).get(f.ranchId)!).push(f);
    return out;
  };
  const live = group(fields);
  const grouped = new Map([...stateAt].map(([c, state]) => [c, group(state.fields)]));
  return ranches.map((r) => {
    const cutoff = cutoffs.get(r.id);
    const state = cutoff ? stateAt.get(cutoff) : undefined;
    const own = (cutoff ? grouped.get(cutoff)!.get(r.id) : live.get(r.id)) ?? [];
    return { ranch: state?.ranches.find((x) => x.id === r.id) ?? r, fields: own, registryAsOf: asOf.get(r.id) ?? now };
  });
}

/**
 * Draft registers of several ranches (all of the organisation's when ranchIds is not given),
 * computed now from the approved walks and from the registry as it stood at each ranch's cut-off.
 */
export async function computeRegisters(db: Knex, organisationId: string, year: number, today: string, ranchIds?: string[], choice: RegistryChoice = {}): Promise<Register[]> {
  const season = seasonOfYear(year);
  const [ranches, rule] = await Promise.all([registerRanches(db, organisationId, ranchIds), creditRuleForYear(db, organisationId, year).then(ruleOfRegister)]);
  const inputs = await registerInputs(db, organisationId, year, ranches, choice, !ranchIds);
  const plantingIds = inputs.flatMap((i) => i.fields.flatMap((f) => (f.plantingId ? [f.plantingId] : [])));
  const walks = walksByPlanting(await approvedWalksFor(db, organisationId, plantingIds));
  const projectionDate = projectionDateOf(year, today);
  return inputs.map(({ ranch, fields, registryAsOf }) => {
    const rows = fields.map((f) => registerRow(f, (f.plantingId && walks.get(f.plantingId)) || [], rule, projectionDate, season));
    return { ...assembleRegister(organisationId, ranch, year, rule, today, rows), registryAsOf };
  });
}

/** The draft register of one ranch for a reporting year, computed now; undefined when the ranch is not the organisation's. */
export async function computeRegister(db: Knex, organisationId: string, ranchId: string, year: number, today: string, choice: RegistryChoice = {}): Promise<Register | undefined> {
  const [register] = await computeRegisters(db, organisationId, year, today, [ranchId], choice);
  return register;
}

// ---- snapshots, hashes, finalisation ----

/** JSON with object keys sorted at every level: the same content always gives the same text. */
export function canonicalJson(value: unknown): string {
  const walk = (v: unknown): unknown => {
    if (Array.isArray(v)) return v.map((x) => (x === undefined ? null : walk(x)));
    if (v && typeof v === 'object') {
      const out: Record<string, unknown> = {};
      for (const k of Object.keys(v).sort()) {
        const x = (v as Record<string, unknown>)[k];
        if (x !== undefined) out[k] = walk(x);
      }
      return out;
    }
    if (typeof v === 'number' && !Number.isFinite(v)) return null;
    return v;
  };
  return JSON.stringify(walk(value));
}

export { sha256Hex };

/** The part of a register that a new version must differ in (not when it was computed). */
const substance = (r: Register) => canonicalJson({ ranch: r.ranch, year: r.year, rule: r.rule, rows: r.rows, totals: r.totals, calibrations: r.calibrations, walkIds: r.walkIds });

export function parseStored(stored: StoredRegister): FinalRegister {
  return { ...(JSON.parse(stored.snapshotText) as FinalSnapshot), id: stored.id, contentHash: stored.contentHash };
}

/** A finalised version of the organisation's register, or undefined (another organisation's id too). */
export async function getFinalRegister(db: Knex, organisationId: string, id: string): Promise<FinalRegister | undefined> {
  const stored = await getRegister(db, organisationId, id);
  return stored && parseStored(stored);
}

/** 409 for finalising rows identical to the latest version: pages word it as a notice, not an error. */
export class UnchangedRegister extends HttpError {
  constructor(readonly version: number) {
    super('conflict', `Nothing changed since version ${version}: an amendment needs a change.`);
  }
}

/**
 * Finalises the ranch's register for the year: computes it, and in one transaction reads the highest
 * version, refuses a version identical to it, and stores the snapshot with its canonical JSON and
 * SHA-256 as the next version (an amendment pointing at the previous one when one exists). Two
 * finalisations racing for the same number meet the unique index: the loser gets 409 `conflict`.
 */
export async function finaliseRegister(
  db: Knex,
  organisationId: string,
  ranchId: string,
  year: number,
  actor: { id: string; name: string },
  today: string,
  keyring: Keyring,
  now: () => string = () => new Date().toISOString(),
  registry: RegistryChoice['registry'] = 'cutoff',
): Promise<FinalRegister> {
  const at = now();
  try {
    return await inTransaction(db, async (trx) => {
      const register = await computeRegister(trx, organisationId, ranchId, year, today, { registry, now: at });
      if (!register) throw new HttpError('not_found');
      const latest = await highestRegisterVersion(trx, organisationId, ranchId, year);
      if (latest) {
        const previous = await getFinalRegister(trx, organisationId, latest.id);
        if (previous && substance(previous) === substance(register)) {
          throw new UnchangedRegister(latest.version);
        }
      }
      const snapshot: FinalSnapshot = {
        ...register,
        version: (latest?.version ?? 0) + 1,
        previousId: latest?.id ?? null,
        finalisedBy: { id: actor.id, name: actor.name },
        finalisedAt: at,
      };
      const snapshotText = canonicalJson(snapshot);
      const contentHash = sha256Hex(snapshotText);
      const stored: StoredRegister = {
        id: randomUUID(),
        ranchId,
        year,
        version: snapshot.version,
        previousId: snapshot.previousId,
        snapshotText,
        contentHash,
        ...signRegister(keyring, linkOf(latest), contentHash),
        ruleId: register.rule.id,
        ruleVersion: register.rule.version,
        finalisedBy: actor.id,
        finalisedByName: actor.name,
        finalisedAt: snapshot.finalisedAt,
      };
      await insertRegister(trx, organisationId, stored);
      return parseStored(stored);
    });
  } catch (err) {
    if (isUniqueViolation(err)) {
      throw new HttpError('conflict', 'Another finalisation of this register was saved at the same moment. Reload to see it.');
    }
    throw err;
  }
}

/** True when the stored text still hashes to the stored hash. */
export const verifyStored = (stored: StoredRegister) => sha256Hex(stored.snapshotText) === stored.contentHash;

/** Whether a stored version's signature holds, checked against the previous version as stored now. */
export async function signatureState(db: Knex, organisationId: string, stored: StoredRegister, keyring: Keyring): Promise<SignatureState> {
  const previous = stored.previousId ? await getRegister(db, organisationId, stored.previousId) : undefined;
  if (stored.previousId && !previous) return 'invalid';
  return verifyRegister(keyring, stored, previous);
}

// Single-query reads and writes the routes and pages use as they are (SQL stays in the db modules).
export { getRegister, latestRegister, listRegisterVersions } from './db';
export { registerRanches } from './inputs-db';
