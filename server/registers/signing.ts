import { createHash, createHmac, timingSafeEqual } from 'node:crypto';

/*
 * What makes a finalised register's hash prove something (README, "Register signatures"). Each
 * version's chain hash is the SHA-256 of the previous version's chain hash and its own content hash,
 * so changing any version breaks every later link; the chain hash is signed with HMAC-SHA256 under a
 * server key that is not kept in the database, so someone who can only write the database cannot
 * make a valid signature for edited content.
 */

export interface SigningKey {
  /** Short, public name of the key, stored with each version: the first 16 hex of SHA-256 of the key. */
  id: string;
  secret: string;
}

export interface Keyring {
  /** The key new versions are signed with; undefined only when none is configured. */
  current?: SigningKey;
  /** Every key that can verify: the current one and the retired ones. */
  byId: Map<string, SigningKey>;
}

export const keyIdOf = (secret: string) => createHash('sha256').update(`crowntip register key\n${secret}`, 'utf8').digest('hex').slice(0, 16);

/** The keyring from the settings: REGISTER_SIGNING_KEY signs, REGISTER_SIGNING_KEYS_OLD (comma separated) still verify. */
export function keyringOf(config: { REGISTER_SIGNING_KEY?: string; REGISTER_SIGNING_KEYS_OLD?: string }): Keyring {
  const byId = new Map<string, SigningKey>();
  const add = (secret: string) => {
    const key = { id: keyIdOf(secret), secret };
    byId.set(key.id, key);
    return key;
  };
  for (const old of (config.REGISTER_SIGNING_KEYS_OLD ?? '').split(',').map((s) => s.trim()).filter(Boolean)) add(old);
  const current = config.REGISTER_SIGNING_KEY ? add(config.REGISTER_SIGNING_KEY) : undefined;
  return { current, byId };
}

export const sha256Hex = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');

/** What a version links to: the previous version's chain hash, or its content hash when it was finalised unsigned; null for a first version. */
export const linkOf = (previous: { chainHash: string | null; contentHash: string } | null | undefined) => (previous ? (previous.chainHash ?? previous.contentHash) : null);

/** SHA-256 of the previous version's link (empty for a first version) and this content hash. */
export const chainHashOf = (previousLink: string | null, contentHash: string) => sha256Hex(`crowntip register chain\n${previousLink ?? ''}\n${contentHash}`);

const hmac = (secret: string, chainHash: string) => createHmac('sha256', secret).update(chainHash, 'utf8').digest('hex');

export interface RegisterSignature {
  chainHash: string;
  signature: string;
  signingKeyId: string;
}

export function signRegister(keyring: Keyring, previousLink: string | null, contentHash: string): RegisterSignature {
  if (!keyring.current) throw new Error('No register signing key is configured (REGISTER_SIGNING_KEY).');
  const chainHash = chainHashOf(previousLink, contentHash);
  return { chainHash, signature: hmac(keyring.current.secret, chainHash), signingKeyId: keyring.current.id };
}

/**
 * valid: the text hashes to its content hash, the chain links to the previous version as stored,
 * and the signature matches under a known key. invalid: any of these fails. unknown_key: signed with
 * a key this server no longer has. unsigned: finalised before signatures were kept.
 */
export type SignatureState = 'valid' | 'invalid' | 'unknown_key' | 'unsigned';

export interface SignedFields {
  snapshotText: string;
  contentHash: string;
  chainHash: string | null;
  signature: string | null;
  signingKeyId: string | null;
}

const sameHex = (a: string, b: string) => a.length === b.length && timingSafeEqual(Buffer.from(a), Buffer.from(b));

export function verifyRegister(keyring: Keyring, stored: SignedFields, previous: { chainHash: string | null; contentHash: string } | null | undefined): SignatureState {
  if (sha256Hex(stored.snapshotText) !== stored.contentHash) return 'invalid';
  if (!stored.signature || !stored.chainHash || !stored.signingKeyId) return 'unsigned';
  if (chainHashOf(linkOf(previous), stored.contentHash) !== stored.chainHash) return 'invalid';
  const key = keyring.byId.get(stored.signingKeyId);
  if (!key) return 'unknown_key';
  return sameHex(hmac(key.secret, stored.chainHash), stored.signature) ? 'valid' : 'invalid';
}

export const SIGNATURE_WORDS: Record<SignatureState, string> = {
  valid: 'signature valid',
  invalid: 'signature invalid',
  unknown_key: 'unknown key',
  unsigned: 'not signed',
};
