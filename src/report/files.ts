import { mkdirSync, rmSync } from 'node:fs';
import { basename, dirname, extname, join } from 'node:path';
import type { RejectedRow } from '../ingest/records.js';
import { renameDurably, writeFileDurably } from '../store/durable-files.js';
import { rejectedRowsToCsv } from '../store/rejected-csv.js';

/**
 * The store's durable steps for one file: write a temporary sibling (`text` whole, or in pieces
 * encoded as they come), flush it, rename it into place.
 */
export function writeFileAtomically(path: string, text: string | Iterable<string>): void {
  const directory = dirname(path);
  mkdirSync(directory, { recursive: true });
  const temporary = join(directory, `.${basename(path)}.${process.pid}.tmp`);
  rmSync(temporary, { force: true }); // a leftover of an earlier run killed with this pid
  writeFileDurably(temporary, text);
  renameDurably(temporary, path, directory);
}

/** The quarantine file beside a report: `report.json` → `report.quarantine.csv`. */
export function quarantinePathFor(reportPath: string): string {
  const extension = extname(reportPath);
  const stem = extension ? reportPath.slice(0, -extension.length) : reportPath;
  return `${stem}.quarantine.csv`;
}

export function writeQuarantine(path: string, rejected: readonly RejectedRow[]): void {
  writeFileAtomically(path, rejectedRowsToCsv(rejected));
}
