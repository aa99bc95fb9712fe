import { randomUUID } from 'node:crypto';
import { linkOf, sha256Hex, signRegister, verifyRegister, type Keyring, type SignatureState } from './signing';
import type { Knex } from 'knex';
import { HttpError } from '../platform/errors';
import {
  approvedWalksFor,
  fieldsWithPlanting,
  registerRanches,
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

/*
 * Credit registers (README, "Credit registers"). The register for reporting year Y covers the
 * plantings of season (Y-1)-(Y mod 100), the winter that ends in Y, judged by the credit rule in
 * effect on 1 January of Y. One row per field of the ranch, planted or not.
 */

export * from './rows';
import { assembleRegister, walksByPlanting, seasonOfYear, ruleOfRegister, projectionDateOf, registerRow, type RegisterRow, type FinalSnapshot, type FinalRegister, type Register } from './rows';

/** Draft registers of several ranches (all of the organisation's when ranchIds is not given), computed now. */
export async function computeRegisters(db: Knex, organisationId: string, year: number, today: string, ranchIds?: string[]): Promise<Register[]> {
  const season = seasonOfYear(year);
  const [ranches, rule, fields] = await Promise.all([
    registerRanches(db, organisationId, ranchIds),
    creditRuleForYear(db, organisationId, year).then(ruleOfRegister),
    fieldsWithPlanting(db, organisationId, { season, ranchIds }),
  ]);
  const walks = walksByPlanting(await approvedWalksFor(db, organisationId, fields.flatMap((f) => (f.plantingId ? [f.plantingId] : []))));
  const projectionDate = projectionDateOf(year, today);
  const rowsByRanch = new Map<string, RegisterRow[]>(ranches.map((r) => [r.id, []]));
  for (const f of fields) {
    rowsByRanch.get(f.ranchId)?.push(registerRow(f, (f.plantingId && walks.get(f.plantingId)) || [], rule, projectionDate, season));
  }
  return ranches.map((r) => assembleRegister(organisationId, r, year, rule, today, rowsByRanch.get(r.id)!));
}

/** The draft register of one ranch for a reporting year, computed now; undefined when the ranch is not the organisation's. */
export async function computeRegister(db: Knex, organisationId: string, ranchId: string, year: number, today: string): Promise<Register | undefined> {
  const [register] = await computeRegisters(db, organisationId, year, today, [ranchId]);
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
): Promise<FinalRegister> {
  try {
    return await db.transaction(async (trx) => {
      const register = await computeRegister(trx, organisationId, ranchId, year, today);
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
        finalisedAt: now(),
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
