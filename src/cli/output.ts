import { mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { dirname, extname, join, basename } from 'node:path';
import type { RejectedRow } from '../ingest/records.js';
import { renderCsv } from '../report/render.js';
import { tableView } from '../report/view.js';

/** Writes a report to --out (atomically: temporary file, then rename) or to standard output. */
export function emit(text: string, out: string | undefined): void {
  if (out === undefined) {
    process.stdout.write(text);
    return;
  }
  writeFileAtomically(out, text);
}

export function writeFileAtomically(path: string, text: string): void {
  mkdirSync(dirname(path), { recursive: true });
  const temporary = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  writeFileSync(temporary, text);
  renameSync(temporary, path);
}

/** The quarantine file beside a report: `report.json` → `report.quarantine.csv`. */
export function quarantinePathFor(reportPath: string): string {
  const extension = extname(reportPath);
  const stem = extension ? reportPath.slice(0, -extension.length) : reportPath;
  return `${stem}.quarantine.csv`;
}

export function writeQuarantine(path: string, rejected: readonly RejectedRow[]): void {
  const rows = rejected.map((row) => [row.file, row.line, row.reason, row.raw]);
  writeFileAtomically(path, renderCsv(tableView('Rejected rows', [], ['file', 'line', 'reason', 'raw'], rows, '')));
}
