import { z } from 'zod';

/** A real calendar date written YYYY-MM-DD. Its own module so the phone's first screen loads only this. */
export const isoDate = z.iso.date({ message: 'Use a date written YYYY-MM-DD.' });
