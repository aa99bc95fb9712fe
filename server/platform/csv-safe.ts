import { stringify } from 'csv-stringify/sync';

/**
 * CSV that Crowntip writes back (templates, examples, error lists, season views, registers).
 *
 * A spreadsheet runs a cell that starts with =, +, -, @, a tab or a carriage return as a formula
 * ("CSV injection", OWASP). Every text cell that starts so gets a leading single quote, which
 * spreadsheets show as text and which a reader of the CSV sees as plain data. Numbers are written
 * as numbers: a negative number is data, not a formula.
 */
const FORMULA_START = /^[=+\-@\t\r]/;

export function safeCsvCell(value: unknown): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  if (typeof value === 'bigint') return String(value);
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  if (value instanceof Date) return Number.isNaN(value.getTime()) ? '' : value.toISOString();
  const text = String(value);
  return FORMULA_START.test(text) ? `'${text}` : text;
}

export type CsvRow = readonly unknown[] | Readonly<Record<string, unknown>>;

export interface CsvOptions {
  /** Start with a UTF-8 byte order mark so that Excel reads accents right (default true). */
  bom?: boolean;
  /** Write the header line (default true); false to append rows to a CSV already begun. */
  header?: boolean;
}

/**
 * One CSV text: the header line, then each row. A row is either an array in header order or an
 * object whose keys are the header names. Comma-separated, CRLF line ends (RFC 4180), quoted where
 * needed (also around semicolons, so a semicolon-locale spreadsheet does not split the cell).
 */
export function toCsv(rows: readonly CsvRow[], header: readonly string[], options: CsvOptions = {}): string {
  const records: string[][] = options.header === false ? [] : [header.map(safeCsvCell)];
  for (const row of rows) {
    const cells = Array.isArray(row) ? row : header.map((h) => (row as Record<string, unknown>)[h]);
    records.push(cells.map(safeCsvCell));
  }
  const text = stringify(records, { record_delimiter: 'windows', quoted_match: /;/ });
  return (options.bom ?? true) ? `\uFEFF${text}` : text;
}
