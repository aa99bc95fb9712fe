import { CsvReadError, readCsv, type CsvTable } from '../../platform/csv-read';

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

/**
 * The uploaded file as the import reads it, through the one CSV reader (server/platform/csv-read.ts:
 * UTF-8 with or without a byte order mark, comma or semicolon, cells trimmed, blank rows skipped);
 * a file it cannot read, and one without rows, is an ImportFileError in plain words.
 */
export function parseCsv(buffer: Uint8Array): ParsedCsv {
  let table: CsvTable;
  try {
    table = readCsv(buffer, { maxRows: MAX_ROWS });
  } catch (err) {
    if (err instanceof CsvReadError) throw new ImportFileError(err.message);
    throw err;
  }
  if (!table.rows.length) throw new ImportFileError('The file has a header line but no rows.');
  return {
    headers: table.header,
    rows: table.rows.map((cells, i) => ({ line: table.startLines[i]!, cells })),
    delimiter: table.delimiter,
    bom: table.bom,
  };
}
