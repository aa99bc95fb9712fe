import type { z } from 'zod';
import { formatUpTo } from '../format/figures';

/*
 * Plain words for every check a schema states without its own message. zod's own texts ("Invalid
 * input: expected number, received string", 'expected one of "cereal_rye"|…') are written for
 * developers; a person reads these instead. Given to every parse of typed input
 * (server/platform/validation.ts), they apply only where the schema has no message of its own.
 * Numbers stored in SI (names ending KgHa, Ha, Cm, M…) are not quoted: their bounds would be in the
 * wrong units for a reader in US units.
 */

type Issue = z.core.$ZodRawIssue;

const SI_SUFFIX = /(KgHa|KgNPerHa|Ha|Cm|M|Kg)$/;

const KIND_WORDS: Record<string, string> = {
  number: 'Enter a number.',
  int: 'Enter a whole number.',
  bigint: 'Enter a whole number.',
  string: 'Enter text here.',
  boolean: 'Choose yes or no.',
  array: 'Choose one or more from the list.',
  object: 'Fill in this part of the form.',
  date: 'Enter a date written YYYY-MM-DD.',
};

const FORMAT_WORDS: Record<string, string> = {
  email: 'Enter an e-mail address, like name@example.org.',
  date: 'Use a date written YYYY-MM-DD.',
  datetime: 'Use a date and time written YYYY-MM-DD HH:MM.',
  time: 'Use a time written HH:MM.',
  url: 'Enter a web address starting with https://.',
  uuid: 'This reference is not valid. Reload the page and try again.',
  regex: 'This is not written the expected way.',
};

const plainNumber = (n: number | bigint) => formatUpTo(Number(n), 6);

/** The plain-words message for one zod issue, or undefined to keep the schema's own message. */
export function plainIssueMessage(issue: Issue): string {
  const last = issue.path?.length ? issue.path[issue.path.length - 1] : undefined;
  const inSi = typeof last === 'string' && SI_SUFFIX.test(last);
  switch (issue.code) {
    case 'invalid_type': {
      if (issue.input === undefined || issue.input === null || issue.input === '') return 'Fill this in.';
      return KIND_WORDS[String(issue.expected)] ?? 'This value is not of the right kind.';
    }
    case 'too_small': {
      const min = issue.minimum as number;
      if (issue.origin === 'string') return Number(min) <= 1 ? 'Fill this in.' : `Use at least ${plainNumber(min)} characters.`;
      if (issue.origin === 'array' || issue.origin === 'set') return Number(min) <= 1 ? 'Choose at least one.' : `Choose at least ${plainNumber(min)}.`;
      if (inSi) return issue.inclusive ? 'This number is too small.' : 'Enter a number more than zero.';
      return issue.inclusive ? `Enter ${plainNumber(min)} or more.` : `Enter a number more than ${plainNumber(min)}.`;
    }
    case 'too_big': {
      const max = issue.maximum as number;
      if (issue.origin === 'string') return `Use at most ${plainNumber(max)} characters.`;
      if (issue.origin === 'array' || issue.origin === 'set') return `Choose at most ${plainNumber(max)}.`;
      if (inSi) return 'This number is larger than is plausible here.';
      return issue.inclusive ? `Enter ${plainNumber(max)} or less.` : `Enter a number less than ${plainNumber(max)}.`;
    }
    case 'invalid_format':
      return FORMAT_WORDS[String(issue.format)] ?? 'This is not written the expected way.';
    case 'not_multiple_of':
      return 'Enter a whole number.';
    case 'invalid_value':
      return 'Choose one of the options offered.';
    case 'unrecognized_keys':
      return 'The form sent something unexpected. Reload the page and try again.';
    case 'invalid_union':
    case 'invalid_key':
    case 'invalid_element':
      return 'This value is not valid.';
    default:
      return 'This value is not valid.';
  }
}

/** For `schema.safeParse(input, { error: plainErrors })`. */
export const plainErrors = (issue: Issue): string => plainIssueMessage(issue);
