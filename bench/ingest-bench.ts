import { cpus } from 'node:os';
import { readCsvBuffer } from '../src/ingest/csv-reader.js';
import { readArrowBuffer } from '../src/ingest/arrow-reader.js';
import { canonicalToArrowIpc } from '../src/ingest/arrow-table.js';
import { toSeriesFrame } from '../src/ingest/convert.js';
import { readParquetBuffer } from '../src/ingest/parquet-reader.js';
import { canonicalToParquetBuffer } from '../fixtures/parquet-writer.js';
import { DEFAULT_PROFILE } from '../src/ingest/profile.js';
import { benchUniverse, navCsv } from './universe.js';
import { epochDay } from '../src/calendar/days.js';

/**
 * Ingestion speed on one core: reads a generated NAV universe several times and reports the best
 * and median rows per second and MB/s. Run with `npm run bench` (after `npm run build`).
 * Arguments: [series] [business days] [runs].
 */
const [seriesCount = 2000, businessDays = 1300, runs = 5] = process.argv.slice(2).map(Number);

interface Measurement {
  readonly label: string;
  readonly rows: number;
  readonly bytes: number;
  /** Wall-clock seconds of each run. */
  readonly seconds: number[];
  /** CPU seconds of each run (user + system): steadier than wall time on a busy machine. */
  readonly cpuSeconds: number[];
}

async function measure(label: string, rows: number, bytes: number, work: () => unknown): Promise<Measurement> {
  await work(); // warm-up: lets the JIT compile the hot path before timing
  const seconds: number[] = [];
  const cpuSeconds: number[] = [];
  for (let run = 0; run < runs; run++) {
    const started = process.hrtime.bigint();
    const cpuStarted = process.cpuUsage();
    await work();
    const cpu = process.cpuUsage(cpuStarted);
    seconds.push(Number(process.hrtime.bigint() - started) / 1e9);
    cpuSeconds.push((cpu.user + cpu.system) / 1e6);
  }
  return { label, rows, bytes, seconds, cpuSeconds };
}

function report(m: Measurement): string {
  const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)];
  const best = Math.min(...m.seconds);
  const rate = (s: number) => `${(m.rows / s / 1e6).toFixed(2)} M rows/s` + (m.bytes > 0 ? `, ${(m.bytes / s / 1e6).toFixed(0)} MB/s` : '');
  return `${m.label.padEnd(34)} wall: best ${rate(best)} (${best.toFixed(3)} s), median ${rate(median(m.seconds))}; CPU median ${rate(median(m.cpuSeconds))}`;
}

// The default universe starts on 2021-01-04; a longer one (2,580 days is the standard universe's
// ten years) starts early enough to end before today, inside the readers' plausible dates.
const daysBack = Math.ceil((businessDays * 7) / 5) + 7;
const universe = benchUniverse(seriesCount, businessDays, Math.min(epochDay(2021, 1, 4), Math.floor(Date.now() / 86_400_000) - daysBack));
const csv = navCsv(universe);
const rows = seriesCount * businessDays;
console.log(`navassay ingestion bench: ${seriesCount} series × ${businessDays} days = ${rows.toLocaleString('en')} NAV rows, CSV ${(csv.length / 1e6).toFixed(1)} MB`);
console.log(`machine: ${cpus()[0]?.model ?? 'unknown cpu'}, ${cpus().length} cores, Node ${process.version}; ${runs} timed runs after one warm-up, one core`);

let parsed = readCsvBuffer(csv, 'bench.csv', 'nav', DEFAULT_PROFILE);
if (parsed.rows.accepted !== rows) throw new Error(`bench data lost rows: ${JSON.stringify(parsed.rows)}`);
const csvResults = [
  await measure('CSV → typed columns', rows, csv.length, () => {
    parsed = readCsvBuffer(csv, 'bench.csv', 'nav', DEFAULT_PROFILE);
  }),
  await measure('typed columns → series frame', rows, 0, () => void toSeriesFrame(parsed.table, 'nav')),
  await measure('CSV → series frame (whole path)', rows, csv.length, () => {
    void toSeriesFrame(readCsvBuffer(csv, 'bench.csv', 'nav', DEFAULT_PROFILE).table, 'nav');
  }),
];
// The Arrow and Parquet inputs are made after the CSV runs, so their buffers do not weigh on them.
const arrow = canonicalToArrowIpc(parsed.table);
const parquet = canonicalToParquetBuffer(parsed.table);
console.log(`same rows as Arrow IPC ${(arrow.length / 1e6).toFixed(1)} MB, as Parquet ${(parquet.length / 1e6).toFixed(1)} MB; MB/s below are of each input's own size`);
const results = [
  ...csvResults,
  await measure('Arrow IPC → typed columns', rows, arrow.length, () => readArrowBuffer(arrow, 'bench.arrow', 'nav', DEFAULT_PROFILE)),
  await measure('Parquet → typed columns', rows, parquet.length, () => readParquetBuffer(parquet, 'bench.parquet', 'nav', DEFAULT_PROFILE)),
];
for (const result of results) console.log(report(result));
