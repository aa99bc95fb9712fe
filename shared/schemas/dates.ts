import { z } from 'zod';

/**
 * Dates Crowntip can believe: cover-crop seasons, walks and rule versions of this century. A typo
 * such as 9999-12-31 or 1900-01-01 would otherwise place a planting in no season and skew registers.
 */
export const EARLIEST_DATE = '2000-01-01';
export const LATEST_DATE = '2099-12-31';

/** A real calendar date written YYYY-MM-DD, between EARLIEST_DATE and LATEST_DATE. Its own module so the phone's first screen loads only this. */
export const isoDate = z.iso
  .date({ message: 'Use a date written YYYY-MM-DD.' })
  .refine((v) => v >= EARLIEST_DATE && v <= LATEST_DATE, `Use a date between ${EARLIEST_DATE} and ${LATEST_DATE}.`);
