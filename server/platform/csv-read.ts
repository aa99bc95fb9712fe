import { parse } from 'csv-parse/sync';
import { formatNumber } from '../../shared/format/figures';

/**
 * Reading an uploaded CSV, the one reader for every upload: calibration points
 * (server/calibrations/import.ts) and the registry import (server/registry/import/read.ts, which
 * adds its own limits and its checks of the columns):
 * - the bytes must be UTF-8, with or without a byte order mark; anything else (a UTF-16 "Unicode
 *   text" export, a Windows-1252 file with é in it) is refused with a message saying how to save it;
 * - the delimiter is a comma or a semicolon (spreadsheets in comma-decimal locales write semicolons),
 *   chosen by which of the two appears more often in the header line outside quotes;
 * - blank lines are skipped, cells are trimmed, rows may be shorter or longer than the header
 *   (the caller decides whether that is an error);
 * - at most `maxRows` data rows, so a huge file fails fast and clearly.
 * Every problem is a CsvReadError with a stable `code` and a plain-words `message`.
 */

export type CsvReadErrorCode = 'empty' | 'not_utf8' | 'malformed' | 'too_many_rows';

export class CsvReadError extends Error {
  constructor(
    readonly code: CsvReadErrorCode,
    message: string,
    /** 1-based line of the file where the problem is, when known. */
    readonly line?: number,
    /** csv-parse's own code for a malformed file (CSV_QUOTE_NOT_CLOSED…), for callers with their own wording. */
    readonly parserCode?: string,
  ) {
    super(message);
    this.name = 'CsvReadError';
  }
}

export interface CsvTable {
  /** The header cells, trimmed. */
  header: string[];
  /** Data rows as read (trimmed cells, blank lines dropped). */
  rows: string[][];
  /** For each row, the 1-based line of the file it ends on (the header is line 1). */
  lines: number[];
  /** For each row, the 1-based line of the file it starts on, as a spreadsheet numbers it (before `lines` when a quoted cell spans lines). */
  startLines: number[];
  delimiter: ',' | ';';
  /** Whether the file began with a UTF-8 byte order mark (a spreadsheet's "CSV UTF-8" writes one); the rows are the same either way. */
  bom: boolean;
}

export interface CsvReadOptions {
  /** Most data rows accepted (default 10,000). */
  maxRows?: number;
}

const SAVE_AS_UTF8 = 'Save the spreadsheet as “CSV UTF-8 (comma delimited)” and upload it again.';

/** The bytes as text: UTF-8 only, a leading byte order mark dropped. */
export function decodeUtf8(bytes: Uint8Array): string {
  if ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff)) {
    throw new CsvReadError('not_utf8', `The file is UTF-16 text, not UTF-8. ${SAVE_AS_UTF8}`);
  }
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(bytes);
  } catch {
    throw new CsvReadError('not_utf8', `The file is not UTF-8 text (it may be an Excel workbook or use an older character set). ${SAVE_AS_UTF8}`);
  }
  if (text.includes('\u0000')) {
    throw new CsvReadError('not_utf8', `The file holds binary data, not CSV text. ${SAVE_AS_UTF8}`);
  }
  return text;
}

/** Comma or semicolon, whichever the header line (outside quotes) has more of; comma on a tie. */
export function detectDelimiter(text: string): ',' | ';' {
  let commas = 0;
  let semicolons = 0;
  let quoted = false;
  for (const ch of text) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === '\n' || ch === '\r')) break;
    else if (!quoted && ch === ',') commas++;
    else if (!quoted && ch === ';') semicolons++;
  }
  return semicolons > commas ? ';' : ',';
}

const CSV_PARSE_MESSAGES: Record<string, string> = {
  CSV_QUOTE_NOT_CLOSED: 'a quoted cell is not closed (a " is missing)',
  INVALID_OPENING_QUOTE: 'a quote " appears inside a cell that is not quoted as a whole',
  CSV_INVALID_CLOSING_QUOTE: 'there is text after the closing quote of a cell',
  CSV_NON_TRIMABLE_CHAR_AFTER_CLOSING_QUOTE: 'there is text after the closing quote of a cell',
};

/** A record as csv-parse reads it, with the 1-based line of the file it ends on. */
type CsvParsedRecord = { record: string[]; info: { lines: number } };

/**
 * The one call of csv-parse: records with their end lines, comma or semicolon, a byte order mark
 * dropped, rows of any length, cells trimmed, records whose cells are all empty skipped; `to`
 * stops after that many records. A malformed file is a CsvReadError('malformed').
 */
function parseCsvRecords(text: string, delimiter: ',' | ';', to: number): CsvParsedRecord[] {
  try {
    return parse(text, {
      delimiter,
      bom: true,
      skip_empty_lines: true,
      relax_column_count: true,
      info: true,
      trim: true,
      skip_records_with_empty_values: true,
      to,
    }) as unknown as CsvParsedRecord[];
  } catch (e) {
    const err = e as { code?: string; lines?: number };
    const what = (err.code && CSV_PARSE_MESSAGES[err.code]) || 'the file cannot be read as CSV';
    throw new CsvReadError('malformed', err.lines ? `Line ${err.lines}: ${what}.` : `The file cannot be read: ${what}.`, err.lines, err.code);
  }
}

/** Line breaks inside the cells of a record (only a quoted cell holds one). */
const newlinesIn = (cells: string[]) => {
  let n = 0;
  for (const c of cells) for (let i = c.indexOf('\n'); i >= 0; i = c.indexOf('\n', i + 1)) n++;
  return n;
};

/** A decoded CSV text as header and rows. */
export function readCsvText(text: string, options: CsvReadOptions = {}): CsvTable {
  const maxRows = options.maxRows ?? 10_000;
  const bom = text.charCodeAt(0) === 0xfeff;
  if (!text.trim()) throw new CsvReadError('empty', 'The file is empty.');
  const delimiter = detectDelimiter(text);
  // One past the limit (plus the header), so "too many" is seen without reading the rest.
  const records = parseCsvRecords(text, delimiter, maxRows + 2);
  const [head, ...data] = records;
  if (!head) throw new CsvReadError('empty', 'The file is empty.');
  if (data.length > maxRows) {
    throw new CsvReadError('too_many_rows', `The file has more than ${formatNumber(maxRows)} rows; split it or remove rows that are not needed.`);
  }
  return {
    header: head.record.map((h) => h.trim()),
    rows: data.map((r) => r.record),
    lines: data.map((r) => r.info.lines),
    startLines: data.map((r) => r.info.lines - newlinesIn(r.record)),
    delimiter,
    bom,
  };
}

const startsWithBom = (bytes: Uint8Array) => bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf;

/** An uploaded file (bytes) as header and rows: decodeUtf8 then readCsvText. */
export function readCsv(bytes: Uint8Array, options: CsvReadOptions = {}): CsvTable {
  return { ...readCsvText(decodeUtf8(bytes), options), bom: startsWithBom(bytes) };
}
