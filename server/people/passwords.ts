import { randomBytes } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { z } from 'zod';

export const passwordSchema = z
  .string()
  .min(10, 'Use at least 10 characters.')
  .max(200, 'Use at most 200 characters.');

export const hashPassword = (password: string, rounds: number) => bcrypt.hash(password, rounds);

/**
 * A hash to compare against when the address is unknown (or has no password yet), made once at
 * start-up with the configured cost, so that both failures take the time of a real comparison and
 * cannot be told apart. A fixed hash of another cost would time differently (bcrypt's work
 * doubles with each step of cost).
 */
export const makeStandInHash = (rounds: number) => bcrypt.hashSync(randomBytes(18).toString('base64'), rounds);

let defaultStandIn: string | undefined;

export async function verifyPassword(password: string, hash: string | null | undefined, standIn?: string): Promise<boolean> {
  if (!hash) {
    await bcrypt.compare(password, standIn ?? (defaultStandIn ??= makeStandInHash(10)));
    return false;
  }
  return bcrypt.compare(password, hash);
}
