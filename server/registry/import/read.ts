import { CsvReadError, detectDelimiter, parseCsvRecords, type CsvParsedRecord } from '../../platform/csv-read';

// One reader for every upload (server/platform/csv-read.ts); this file keeps the import's own rules and wording.
export { detectDelimiter };

// 2. Reading the file -------------------------------------------------------------------------

export const MAX_UPLOAD_BYTES = 5 * 1024 * 1024;
/** A larger file holds the database for too long in one transaction: split it. */
export const MAX_ROWS = 20_000;

export class ImportFileError extends Error {}

export interface CsvRecord {
  /** Line of the file where the row starts (the header is line 1), as a spreadsheet numbers it. */
  line: number;
  cells: string[];
}

export interface ParsedCsv {
  headers: string[];
  rows: CsvRecord[];
  delimiter: ',' | ';';
  bom: boolean;
}

/** UTF-8 text, with or without a byte order mark; anything else is refused with a hint. */
export function decodeUtf8(buffer: Uint8Array): { text: string; bom: boolean } {
  const bom = buffer.length >= 3 && buffer[0] === 0xef && buffer[1] === 0xbb && buffer[2] === 0xbf;
  if ((buffer[0] === 0xff && buffer[1] === 0xfe) || (buffer[0] === 0xfe && buffer[1] === 0xff)) {
    throw new ImportFileError('The file is UTF-16 (“Unicode text”), not UTF-8. In your spreadsheet choose “Save as” → “CSV UTF-8” and upload that file.');
  }
  try {
    // TextDecoder drops the BOM itself (ignoreBOM false).
    return { text: new TextDecoder('utf-8', { fatal: true }).decode(buffer), bom };
  } catch {
    throw new ImportFileError('The file is not UTF-8 text. In your spreadsheet choose “Save as” → “CSV UTF-8” and upload that file.');
  }
}

const countNewlines = (cells: string[]) => {
  let n = 0;
  for (const c of cells) for (let i = c.indexOf('\n'); i >= 0; i = c.indexOf('\n', i + 1)) n++;
  return n;
};

export function parseCsv(buffer: Uint8Array): ParsedCsv {
  const { text, bom } = decodeUtf8(buffer);
  if (!text.trim()) throw new ImportFileError('The file is empty.');
  const delimiter = detectDelimiter(text);
  let records: CsvParsedRecord[];
  try {
    records = parseCsvRecords(text, delimiter);
  } catch (err) {
    if (!(err instanceof CsvReadError)) throw err;
    const where = err.line ? ` near line ${err.line}` : '';
    const why = err.parserCode === 'CSV_QUOTE_NOT_CLOSED' ? 'a quote (") is opened and never closed' : 'it is not well-formed CSV';
    throw new ImportFileError(`The file cannot be read${where}: ${why}.`);
  }
  if (!records.length) throw new ImportFileError('The file is empty.');
  const headers = records[0]!.record.map((h) => h.trim());
  if (!headers.some(Boolean)) throw new ImportFileError('The first line should name the columns, but it is empty.');
  const rows: CsvRecord[] = [];
  for (let i = 1; i < records.length; i++) {
    const { record, info } = records[i]!;
    if (record.every((c) => c.trim() === '')) continue;
    rows.push({ line: info.lines - countNewlines(record), cells: record });
  }
  if (!rows.length) throw new ImportFileError('The file has a header line but no rows.');
  if (rows.length > MAX_ROWS) {
    throw new ImportFileError(`The file has ${rows.length.toLocaleString('en-US')} rows; Crowntip imports at most ${MAX_ROWS.toLocaleString('en-US')} at once. Split it into smaller files.`);
  }
  return { headers, rows, delimiter, bom };
}
