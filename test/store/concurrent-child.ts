/**
 * A child process for the concurrent-writers test: writes `count` snapshots of the same feed,
 * one per day starting at `firstDay` (day of January 2026), then exits 0. Two of these run at
 * once against the same store.
 */
import { readCsvBuffer } from '../../src/ingest/csv-reader.js';
import { DEFAULT_PROFILE } from '../../src/ingest/profile.js';
import { writeSnapshot } from '../../src/store/index.js';

const [store, firstDay, count] = process.argv.slice(2);
const lines = ['series_id,date,nav'];
for (let i = 0; i < 20000; i++) lines.push(`FUND-${i % 97},2026-01-02,${firstDay}`);
const result = readCsvBuffer(Buffer.from(lines.join('\n') + '\n'), 'nav.csv', 'nav', DEFAULT_PROFILE);
for (let k = 0; k < Number(count); k++) {
  const asOf = `2026-01-${String(Number(firstDay) + k).padStart(2, '0')}`;
  writeSnapshot(store, { feed: 'shared', asOf, results: [result], sources: [{ kind: 'nav', path: 'nav.csv', sha256: '0'.repeat(64) }] });
}
