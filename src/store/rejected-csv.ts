import type { RejectedRow } from '../ingest/records.js';

/**
 * The quarantine of a snapshot: every row the day's files could not read, as CSV with the
 * columns `file,line,raw,reason`, so a person can open it in any spreadsheet.
 */
export const REJECTED_HEADER = ['file', 'line', 'raw', 'reason'] as const;

export function rejectedRowsToCsv(rows: readonly RejectedRow[]): string {
  const lines = [REJECTED_HEADER.join(',')];
  for (const row of rows) lines.push([row.file, String(row.line), row.raw, row.reason].map(quoteField).join(','));
  return `${lines.join('\n')}\n`;
}

function quoteField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replaceAll('"', '""')}"` : value;
}

/** Reads back what `rejectedRowsToCsv` wrote (RFC 4180 quoting, fields may span lines). */
export function rejectedRowsFromCsv(text: string): RejectedRow[] {
  const records = parseCsvRecords(text);
  const header = records.shift();
  if (!header || header.join(',') !== REJECTED_HEADER.join(',')) {
    throw new Error(`rejected rows file does not start with ${REJECTED_HEADER.join(',')}`);
  }
  return records.map(([file, line, raw, reason]) => ({ file, line: Number(line), raw, reason }));
}

function parseCsvRecords(text: string): string[][] {
  const records: string[][] = [];
  let record: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') {
        field += '"';
        i++;
      } else if (c === '"') quoted = false;
      else field += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') {
      record.push(field);
      field = '';
    } else if (c === '\n') {
      record.push(field);
      records.push(record);
      record = [];
      field = '';
    } else field += c;
  }
  if (field !== '' || record.length > 0) records.push([...record, field]);
  return records;
}
