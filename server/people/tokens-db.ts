import { createHash, randomBytes, randomUUID } from 'node:crypto';
import type { Knex } from 'knex';
import { nowIso } from '../platform/scope';

export type TokenPurpose = 'invite' | 'reset';

const hashOf = (token: string) => createHash('sha256').update(token).digest('hex');

/** Makes a one-time link token; only its hash is stored. Earlier unused tokens of the same purpose stop working. */
export async function issueUserToken(db: Knex, userId: string, purpose: TokenPurpose, ttlMs: number): Promise<string> {
  const token = randomBytes(32).toString('base64url');
  const now = Date.now();
  await db.transaction(async (trx) => {
    await trx('user_tokens').where({ user_id: userId, purpose }).whereNull('used_at').update({ used_at: nowIso() });
    await trx('user_tokens').insert({
      id: randomUUID(),
      user_id: userId,
      purpose,
      token_hash: hashOf(token),
      expires_at: new Date(now + ttlMs).toISOString(),
      created_at: new Date(now).toISOString(),
    });
  });
  return token;
}

export type TokenCheck = { ok: true; userId: string } | { ok: false; reason: 'unknown' | 'used' | 'expired' };

export async function checkUserToken(db: Knex, token: string, purpose: TokenPurpose): Promise<TokenCheck> {
  const row = await db('user_tokens').where({ token_hash: hashOf(token), purpose }).first();
  if (!row) return { ok: false, reason: 'unknown' };
  if (row.used_at) return { ok: false, reason: 'used' };
  if (new Date(row.expires_at).getTime() <= Date.now()) return { ok: false, reason: 'expired' };
  return { ok: true, userId: row.user_id };
}

/** Marks the token used; false when another request used it first (single use even under races). */
export async function spendUserToken(db: Knex, token: string, purpose: TokenPurpose): Promise<boolean> {
  const n = await db('user_tokens')
    .where({ token_hash: hashOf(token), purpose })
    .whereNull('used_at')
    .where('expires_at', '>', nowIso())
    .update({ used_at: nowIso() });
  return n === 1;
}
