import { cpus } from 'node:os';
import { generateUniverse } from '../fixtures/universe/generate.js';
import { runChecks } from '../src/checks/run.js';
import { computeMetrics } from '../src/metrics/compute.js';
import { DEFAULT_METHODOLOGY } from '../src/metrics/methodology.js';

/**
 * The daily job after ingestion, at universe scale: every check over every series, then every
 * risk figure for 1y, 3y and 5y. Uses the invented test universe without planted faults.
 * Arguments: [funds] [business days] [runs]. Run with `npx tsx bench/daily-job-bench.ts`.
 */
const [funds = 2000, businessDays = 1400, runs = 3] = process.argv.slice(2).map(Number);
const universe = generateUniverse({ seed: 7, funds, businessDays, faultsPerKind: 0 });
const rows = universe.nav.dates.length;
console.log(`navassay daily-job bench: ${funds} series, ${businessDays} business days, ${rows.toLocaleString('en')} NAV rows`);
console.log(`machine: ${cpus()[0]?.model ?? 'unknown cpu'}, ${cpus().length} cores, Node ${process.version}; ${runs} timed runs after one warm-up, one core`);

function time(label: string, work: () => unknown): void {
  work();
  const seconds: number[] = [];
  for (let run = 0; run < runs; run++) {
    const started = process.hrtime.bigint();
    work();
    seconds.push(Number(process.hrtime.bigint() - started) / 1e9);
  }
  seconds.sort((a, b) => a - b);
  const median = seconds[Math.floor(seconds.length / 2)];
  console.log(`${label.padEnd(40)} best ${seconds[0].toFixed(2)} s, median ${median.toFixed(2)} s (${(funds / median).toFixed(0)} series/s)`);
}

time('every check over every series', () => runChecks(universe));
time('12 metrics × 1y, 3y, 5y for every series', () =>
  computeMetrics({
    nav: universe.nav,
    benchmarks: universe.benchmarks,
    master: universe.master,
    constantRate: 0.02,
    asOf: universe.asOf,
    windows: ['1y', '3y', '5y'],
    methodology: DEFAULT_METHODOLOGY,
  }),
);
