import { writeFileAtomically } from '../report/files.js';
import { requireFileLocation } from './locations.js';

export { quarantinePathFor, writeFileAtomically, writeQuarantine } from '../report/files.js';

/** Writes a report to --out (atomically: temporary file, then rename) or to standard output. */
export function emit(text: string, out: string | undefined): void {
  if (out === undefined) {
    process.stdout.write(text);
    return;
  }
  requireFileLocation(out, '--out');
  writeFileAtomically(out, text);
}
