/**
 * A child process for the kill test: writes the same day's snapshot of a feed again and again,
 * each time with a NAV table of `rows` rows all holding the value `version`, until it is killed.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { readCsvBuffer } from '../../src/ingest/csv-reader.js';
import { DEFAULT_PROFILE } from '../../src/ingest/profile.js';
import { sha256File, writeSnapshot } from '../../src/store/index.js';

const [store, work, version, rows] = process.argv.slice(2);
const lines = ['series_id,date,nav'];
for (let i = 0; i < Number(rows); i++) lines.push(`FUND-${i % 997},2026-11-30,${version}`);
const source = join(work, `nav-${version}.csv`);
writeFileSync(source, lines.join('\n') + '\n');
const result = readCsvBuffer(Buffer.from(lines.join('\n') + '\n'), source, 'nav', DEFAULT_PROFILE);
process.stdout.write('ready\n');
for (;;) {
  writeSnapshot(store, { feed: 'kill-test', asOf: '2026-11-30', results: [result], sources: [{ kind: 'nav', path: source, sha256: sha256File(source) }] });
}
