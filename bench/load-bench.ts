/**
 * The load and store stages alone, in one fresh process: read a day's feed (CSV or Arrow, as the
 * run configuration names it), shape it for the later stages, and, from CSV, write the Arrow
 * snapshot into a scratch store. Prints one JSON line: wall and CPU seconds per stage, NAV rows,
 * and the peak resident memory after each stage. The whole-audit bench (audit-bench.ts) times
 * these stages too, but among the checks, which dominate; this one lets ingestion be compared
 * before and after a change in a minute.
 *
 *   node dist/bench/load-bench.js CONFIG SCRATCH_STORE [--no-store]
 *
 * CONFIG is a run configuration such as the audit bench writes beside its cached universe
 * (run-csv/navassay.yaml or run-arrow/navassay.yaml); only its files and as-of are used. The
 * scratch store is emptied first, so nothing is written where another run may be reading.
 */
import { rmSync } from 'node:fs';
import { loadRunConfig } from '../src/config/run-config.js';
import { parseAsOf } from '../src/cli/options.js';
import { loadOptionsOf } from '../src/job/daily-job.js';
import { loadDay } from '../src/job/day.js';
import { snapshotStage } from '../src/job/stages/snapshot.js';

const [configPath, store] = process.argv.slice(2);
if (!configPath || !store) throw new Error('usage: load-bench CONFIG SCRATCH_STORE [--no-store]');
const withStore = !process.argv.includes('--no-store');
const config = loadRunConfig(configPath);
const asOf = parseAsOf(config.as_of);
rmSync(store, { recursive: true, force: true });

const stages: Record<string, { wall: number; cpu: number; rssMiB: number }> = {};
async function stage<T>(name: string, work: () => T | Promise<T>): Promise<T> {
  const t0 = process.hrtime.bigint();
  const cpu0 = process.cpuUsage();
  const result = await work();
  const used = process.cpuUsage(cpu0);
  stages[name] = {
    wall: Number(process.hrtime.bigint() - t0) / 1e9,
    cpu: (used.user + used.system) / 1e6,
    rssMiB: Math.round(process.resourceUsage().maxRSS / 1024),
  };
  return result;
}

const day = await stage('ingest', () => loadDay({ paths: config.paths, asOf, load: loadOptionsOf(config, asOf), previous: { kind: 'none' } }));
if (withStore) await stage('store', () => snapshotStage(day, { store, feed: config.feed }));
console.log(JSON.stringify({ navRows: day.feed.nav.dates.length, rows: day.feed.rows, stages }));
