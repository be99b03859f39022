/**
 * One whole daily audit in its own process, timed stage by stage: the audit bench
 * (`bench/audit-bench.ts`) starts this file as a child several times and reads the JSON line it
 * prints last. The stages are those of `navassay run` (src/cli/commands/run.ts): read the feed,
 * run every check, compute the risk figures for the configured windows, reconcile (when the
 * project has that stage), store the snapshot, write the reports.
 *
 *   node dist/bench/audit-child.js CONFIG [--threads N]
 *
 * Each stage reports wall seconds and CPU seconds (user + system, every thread of the process):
 * on a shared machine the CPU figure is the steadier one.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { lastMonthEndOnOrBefore } from '../src/calendar/days.js';
import { defaultThreads, runChecksInParallel } from '../src/checks/parallel.js';
import { loadRunConfig } from '../src/config/run-config.js';
import { loadFeed } from '../src/ingest/feed.js';
import { computeMetrics } from '../src/metrics/compute.js';
import { checkAnswer, checkView } from '../src/report/check-answer.js';
import { metricsView } from '../src/report/metrics-answer.js';
import { render } from '../src/report/render.js';
import { adjustForCorporateActions } from '../src/series/adjust.js';
import { loadOptionsOf, parseAsOf } from '../src/cli/options.js';
import { writeFileAtomically, writeQuarantine } from '../src/cli/output.js';
import { storeSnapshot } from '../src/cli/snapshots.js';

export interface ChildReport {
  readonly stages: Record<string, number>;
  readonly cpu: Record<string, number>;
  readonly threads: number;
  readonly skipped: string[];
  readonly navRows: number;
  readonly rowsRead: number;
  readonly findings: number;
  readonly figures: number;
  readonly maxRssBytes: number;
}

const started = process.hrtime.bigint();
const configPath = process.argv[2];
const config = loadRunConfig(configPath);
const asOf = parseAsOf(config.as_of);
const threadsAt = process.argv.indexOf('--threads');
const threads = threadsAt > 0 ? Number(process.argv[threadsAt + 1]) : (config.threads ?? defaultThreads());
const stages: Record<string, number> = {};
const cpu: Record<string, number> = {};
const skipped: string[] = [];

async function stage<T>(name: string, work: () => T | Promise<T>): Promise<T> {
  const t0 = process.hrtime.bigint();
  const cpu0 = process.cpuUsage();
  const result = await work();
  stages[name] = Number(process.hrtime.bigint() - t0) / 1e9;
  const used = process.cpuUsage(cpu0);
  cpu[name] = (used.user + used.system) / 1e6;
  return result;
}

const feed = await stage('ingest', () => loadFeed(config.paths, loadOptionsOf(config, asOf)));
const findings = await stage('checks', () => runChecksInParallel({ ...feed, asOf }, config.checks, { threads }));
const check = checkAnswer(asOf, feed.rows, findings);
const metrics = await stage('metrics', () =>
  computeMetrics({
    nav: adjustForCorporateActions(feed.nav, feed.actions ?? []),
    benchmarks: feed.benchmarks!,
    master: feed.master!,
    rates: feed.rates,
    asOf: lastMonthEndOnOrBefore(asOf),
    windows: config.windows,
    methodology: config.methodology,
  }),
);
// The reconciliation stage (src/reconcile/) is timed once the project has it.
if (!existsSync(new URL('../src/reconcile/', import.meta.url))) skipped.push('reconcile (no src/reconcile stage in this build)');
if (config.store !== '') await stage('store', () => storeSnapshot(config, asOf, feed));
await stage('reports', () => {
  for (const format of config.output.formats) {
    writeFileAtomically(join(config.output.dir, `check.${format}`), render(format, check, checkView(check)));
    writeFileAtomically(join(config.output.dir, `metrics.${format}`), render(format, metrics, metricsView(metrics)));
  }
  writeQuarantine(join(config.output.dir, 'quarantine.csv'), feed.rejected);
});
stages.total = Number(process.hrtime.bigint() - started) / 1e9;
const whole = process.cpuUsage();
cpu.total = (whole.user + whole.system) / 1e6;

const report: ChildReport = {
  stages,
  cpu,
  threads,
  skipped,
  navRows: feed.nav.dates.length,
  rowsRead: feed.rows.read,
  findings: findings.length,
  figures: metrics.metrics.length,
  maxRssBytes: process.resourceUsage().maxRSS * 1024,
};
console.log(JSON.stringify(report));
