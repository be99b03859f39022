/**
 * One whole daily audit in its own process, timed stage by stage: the audit bench
 * (`bench/audit-bench.ts`) starts this file as a child several times and reads the JSON line it
 * prints last. The stages are those of `navassay run` (src/job/daily-job.ts): read the feed,
 * run every check, compute the risk figures for the configured windows, reconcile (when the
 * project has that stage), store the snapshot, write the reports.
 *
 *   node dist/bench/audit-child.js CONFIG [--threads N]
 *
 * Each stage reports wall seconds and CPU seconds (user + system, every thread of the process):
 * on a shared machine the CPU figure is the steadier one.
 */
import { lastMonthEndOnOrBefore } from '../src/calendar/days.js';
import { checkWorkersAhead } from '../src/checks/check-workers.js';
import { defaultThreads } from '../src/checks/parallel.js';
import { loadRunConfig } from '../src/config/run-config.js';
import { beside, loadOptionsOf } from '../src/job/daily-job.js';
import { loadDay } from '../src/job/day.js';
import { answersStage } from '../src/job/stages/answers.js';
import { checkStage } from '../src/job/stages/checks.js';
import { computeFigures, markFigures } from '../src/job/stages/metrics.js';
import { reconcileStage } from '../src/job/stages/reconcile.js';
import { ticketsStage } from '../src/job/stages/tickets.js';
import { startSnapshotInBackground } from '../src/job/stages/snapshot.js';
import { parseAsOf } from '../src/cli/options.js';

export interface ChildReport {
  readonly stages: Record<string, number>;
  readonly cpu: Record<string, number>;
  readonly threads: number;
  readonly skipped: string[];
  readonly navRows: number;
  /** NAV rows of the previous day's snapshot the run loaded from the store (0 without one). */
  readonly previousRows?: number;
  readonly rowsRead: number;
  readonly findings: number;
  readonly figures: number;
  readonly maxRssBytes: number;
  /** The process's peak resident memory at the end of each stage, so the stage that set it shows. */
  readonly peakAfter: Record<string, number>;
  /** Wall seconds of work done on another thread while later stages ran (the snapshot's write). */
  readonly background?: Record<string, number>;
}

const started = process.hrtime.bigint();
const configPath = process.argv[2];
const config = loadRunConfig(configPath);
const asOf = parseAsOf(config.as_of);
const threadsAt = process.argv.indexOf('--threads');
const threads = threadsAt > 0 ? Number(process.argv[threadsAt + 1]) : (config.threads ?? defaultThreads());
const stages: Record<string, number> = {};
const cpu: Record<string, number> = {};
const peakAfter: Record<string, number> = {};
const skipped: string[] = [];
const background: Record<string, number> = {};

async function stage<T>(name: string, work: () => T | Promise<T>): Promise<T> {
  const t0 = process.hrtime.bigint();
  const cpu0 = process.cpuUsage();
  const result = await work();
  stages[name] = Number(process.hrtime.bigint() - t0) / 1e9;
  const used = process.cpuUsage(cpu0);
  cpu[name] = (used.user + used.system) / 1e6;
  peakAfter[name] = process.resourceUsage().maxRSS * 1024;
  return result;
}

// The stages of the daily job (src/job/daily-job.ts), each timed on its own. As in the daily
// job, a large feed's check workers start with the reading (their start-up is in the ingest row).
const workers = checkWorkersAhead(config.paths.nav, threads);
const day = await stage('ingest', () => loadDay({ paths: config.paths, asOf, load: loadOptionsOf(config, asOf), previous: { kind: 'store', store: config.store, feed: config.feed } }));
// As in the daily job, this thread computes the risk figures while the check workers run: the
// 'checks' row holds both, `background.figures` the figures' share; the 'metrics' row is the
// marks left for after the checks.
const figureRequest = { asOf: lastMonthEndOnOrBefore(asOf), windows: config.windows, methodology: config.methodology };
let figures: ReturnType<typeof computeFigures> = null;
const check = await stage('checks', async () => {
  const checking = checkStage(day, config.checks, { threads, workers });
  const figuresStarted = process.hrtime.bigint();
  figures = await beside(checking, () => computeFigures(day, figureRequest));
  background.figures = Number(process.hrtime.bigint() - figuresStarted) / 1e9;
  return checking;
});
workers.release();
// Then the snapshot is written on its own thread to the end of the reports; the 'store' row is
// the wait that is left after them, `background.store` the whole write.
const storeStarted = process.hrtime.bigint();
const storing = startSnapshotInBackground(day, { store: config.store, feed: config.feed, previous: config.previous });
const stored = storing.stored.then((snapshot) => {
  background.store = Number(process.hrtime.bigint() - storeStarted) / 1e9;
  return snapshot;
});
stored.catch(() => {});
const metrics = await stage('metrics', () => markFigures(day, figures, check.findings));
const reconciliation = await stage('reconcile', () =>
  reconcileStage(day, check.findings, { methodology: config.methodology, tolerances: config.reconcile.tolerances, through: asOf }),
);
const tickets = await stage('tickets', () =>
  ticketsStage(day, check.findings, reconciliation, { store: config.store, feed: config.feed, acknowledgements: config.acknowledgements }),
);
await stage('reports', () =>
  answersStage(day, { feed: config.feed, check, metrics, reconciliation, tickets, notices: storing.notices }, config.output),
);
await stage('store', () => stored);
stages.total = Number(process.hrtime.bigint() - started) / 1e9;
const whole = process.cpuUsage();
cpu.total = (whole.user + whole.system) / 1e6;

const report: ChildReport = {
  stages,
  cpu,
  threads,
  skipped,
  navRows: day.feed.nav.dates.length,
  previousRows: day.previous?.dates.length ?? 0,
  rowsRead: day.feed.rows.read,
  findings: check.findings.length,
  figures: metrics?.metrics.length ?? 0,
  maxRssBytes: process.resourceUsage().maxRSS * 1024,
  peakAfter,
  background,
};
console.log(JSON.stringify(report));
