import { writeFileAtomically } from '../report/files.js';
import { requireFileLocation } from './locations.js';

export { quarantinePathFor, writeFileAtomically, writeQuarantine } from '../report/files.js';

/**
 * Writes a report to --out (atomically: temporary file, then rename) or to standard output. A
 * report in pieces (a large JSON answer, see json-pieces.ts) is written as it is made, never
 * held whole.
 */
export function emit(text: string | Iterable<string>, out: string | undefined): void {
  if (out !== undefined) {
    requireFileLocation(out, '--out');
    writeFileAtomically(out, text);
  } else if (typeof text === 'string') {
    process.stdout.write(text);
  } else {
    for (const batch of batchesOf(text)) process.stdout.write(batch);
  }
}

/** Characters per write to standard output: small pieces are joined, so a write is never tiny. */
const STDOUT_BATCH = 1 << 16;

function* batchesOf(pieces: Iterable<string>): Generator<string> {
  let batch = '';
  for (const piece of pieces) {
    batch += piece;
    if (batch.length >= STDOUT_BATCH) {
      yield batch;
      batch = '';
    }
  }
  if (batch.length > 0) yield batch;
}
