import bcrypt from 'bcryptjs';
import { z } from 'zod';

export const passwordSchema = z
  .string()
  .min(10, 'Use at least 10 characters.')
  .max(200, 'Use at most 200 characters.');

export const hashPassword = (password: string, rounds: number) => bcrypt.hash(password, rounds);

// A fixed hash to compare against when the address is unknown, so that both failures take the
// same time and cannot be told apart.
const DUMMY_HASH = '$2b$10$CwTycUXWue0Thq9StjUM0uJ8.2cQ7a3n/6kE1bPqVb5pV9eU7c0yS';

export async function verifyPassword(password: string, hash: string | null | undefined): Promise<boolean> {
  if (!hash) {
    await bcrypt.compare(password, DUMMY_HASH);
    return false;
  }
  return bcrypt.compare(password, hash);
}
