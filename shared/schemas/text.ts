import { z } from 'zod';

/*
 * The one check of typed text (names, codes, notes, reasons) used by every input schema here:
 * refuses characters that are invisible or change how text around them is shown. NUL and the other
 * control characters break exports and logs; bidirectional overrides and isolates can make a name
 * read differently from what is stored (Unicode Technical Standard #39 and CVE-2021-42574,
 * "Trojan Source"); a lone surrogate is half of a character and cannot be stored as UTF-8.
 * Multi-line text keeps line breaks and tabs.
 */

const CONTROL_SINGLE_LINE = /[\u0000-\u001F\u007F-\u009F\u2028\u2029]/;
const CONTROL_MULTI_LINE = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F-\u009F]/;
const BIDI = /[\u061C\u200E\u200F\u202A-\u202E\u2066-\u2069]/;
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

export const TEXT_MESSAGES = {
  control: 'Remove the invisible control characters (pasted from another program) and type it again.',
  lineBreak: 'Keep this on one line: remove the line breaks and tabs.',
  bidi: 'Remove the hidden text-direction marks: they make the text read differently from what is stored.',
  surrogate: 'This holds a broken character (half of an emoji or symbol). Delete it and type it again.',
} as const;

/** The plain-words problem with a typed text, or null when it may be stored. */
export function textProblem(value: string, { multiline = false } = {}): string | null {
  if (LONE_SURROGATE.test(value)) return TEXT_MESSAGES.surrogate;
  if (BIDI.test(value)) return TEXT_MESSAGES.bidi;
  if (!multiline && /[\t\n\r\u2028\u2029]/.test(value)) return TEXT_MESSAGES.lineBreak;
  if ((multiline ? CONTROL_MULTI_LINE : CONTROL_SINGLE_LINE).test(value)) return TEXT_MESSAGES.control;
  return null;
}

/** A trimmed text of at most `max` characters that passes `textProblem`. */
export function plainText(max: number, { multiline = false } = {}) {
  return z
    .string()
    .trim()
    .max(max, `Use at most ${max} characters.`)
    .superRefine((v, ctx) => {
      const problem = textProblem(v, { multiline });
      if (problem) ctx.addIssue({ code: 'custom', message: problem });
    });
}
