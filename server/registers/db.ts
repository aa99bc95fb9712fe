import type { Knex } from 'knex';
import { inOrganisation } from '../platform/scope';

/*
 * Finalised credit registers. Insert and read only: there is deliberately no update or delete
 * function, because a finalised register never changes (a later change is a new version).
 */

export interface StoredRegister {
  id: string;
  ranchId: string;
  year: number;
  version: number;
  previousId: string | null;
  /** The canonical JSON text exactly as it was hashed. */
  snapshotText: string;
  contentHash: string;
  ruleId: string | null;
  ruleVersion: number | null;
  finalisedBy: string | null;
  finalisedByName: string;
  finalisedAt: string;
  /** Chain hash, its HMAC signature and the signing key's id; null on versions finalised before signing. */
  chainHash: string | null;
  signature: string | null;
  signingKeyId: string | null;
}

export type RegisterVersionSummary = Omit<StoredRegister, 'snapshotText'>;

type Row = Record<string, unknown>;

const toSummary = (r: Row): RegisterVersionSummary => ({
  id: r.id as string,
  ranchId: r.ranch_id as string,
  year: Number(r.year),
  version: Number(r.version),
  previousId: (r.previous_id as string) ?? null,
  contentHash: r.content_hash as string,
  ruleId: (r.rule_id as string) ?? null,
  ruleVersion: r.rule_version == null ? null : Number(r.rule_version),
  finalisedBy: (r.finalised_by as string) ?? null,
  finalisedByName: r.finalised_by_name as string,
  finalisedAt: String(r.finalised_at),
  chainHash: (r.chain_hash as string) ?? null,
  signature: (r.signature as string) ?? null,
  signingKeyId: (r.signing_key_id as string) ?? null,
});

const toStored = (r: Row): StoredRegister => ({ ...toSummary(r), snapshotText: r.snapshot as string });

const SUMMARY_COLUMNS = ['id', 'ranch_id', 'year', 'version', 'previous_id', 'content_hash', 'rule_id', 'rule_version', 'finalised_by', 'finalised_by_name', 'finalised_at', 'chain_hash', 'signature', 'signing_key_id'];

export async function getRegister(db: Knex, organisationId: string, id: string): Promise<StoredRegister | undefined> {
  const row = await inOrganisation(db, 'registers', organisationId).where('id', id).first();
  return row && toStored(row);
}

/** The newest version of a ranch's register for a year, if one was finalised. */
export async function latestRegister(db: Knex, organisationId: string, ranchId: string, year: number): Promise<StoredRegister | undefined> {
  const row = await inOrganisation(db, 'registers', organisationId).where({ ranch_id: ranchId, year }).orderBy('version', 'desc').first();
  return row && toStored(row);
}

/** Every finalised version of a ranch's register for a year, newest first (without the snapshots). */
export async function listRegisterVersions(db: Knex, organisationId: string, ranchId: string, year: number): Promise<RegisterVersionSummary[]> {
  const rows = await inOrganisation(db, 'registers', organisationId).where({ ranch_id: ranchId, year }).orderBy('version', 'desc').select(SUMMARY_COLUMNS);
  return rows.map(toSummary);
}

/** The newest version per ranch for a year (without the snapshots). */
export async function latestRegistersOfYear(db: Knex, organisationId: string, year: number): Promise<Map<string, RegisterVersionSummary>> {
  const rows = await inOrganisation(db, 'registers', organisationId).where('year', year).orderBy('version', 'asc').select(SUMMARY_COLUMNS);
  const out = new Map<string, RegisterVersionSummary>();
  for (const r of rows) out.set(r.ranch_id as string, toSummary(r));
  return out;
}

export async function highestRegisterVersion(
  db: Knex,
  organisationId: string,
  ranchId: string,
  year: number,
): Promise<{ id: string; version: number; contentHash: string; chainHash: string | null } | undefined> {
  const row = await inOrganisation(db, 'registers', organisationId).where({ ranch_id: ranchId, year }).orderBy('version', 'desc').first('id', 'version', 'content_hash', 'chain_hash');
  return row && { id: row.id as string, version: Number(row.version), contentHash: row.content_hash as string, chainHash: (row.chain_hash as string) ?? null };
}

export async function insertRegister(db: Knex, organisationId: string, r: StoredRegister): Promise<void> {
  await db('registers').insert({
    id: r.id,
    organisation_id: organisationId,
    ranch_id: r.ranchId,
    year: r.year,
    version: r.version,
    previous_id: r.previousId,
    snapshot: r.snapshotText,
    content_hash: r.contentHash,
    rule_id: r.ruleId,
    rule_version: r.ruleVersion,
    finalised_by: r.finalisedBy,
    finalised_by_name: r.finalisedByName,
    finalised_at: r.finalisedAt,
    chain_hash: r.chainHash,
    signature: r.signature,
    signing_key_id: r.signingKeyId,
  });
}

/** A unique-index violation (SQLite or PostgreSQL): another finalisation took this version number. */
export function isUniqueViolation(err: unknown): boolean {
  const e = err as { code?: string; message?: string };
  return e?.code === 'SQLITE_CONSTRAINT_UNIQUE' || e?.code === '23505' || /UNIQUE constraint failed/.test(String(e?.message ?? ''));
}
