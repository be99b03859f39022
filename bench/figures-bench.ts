/**
 * The figures and the reconcile stage alone, several times in one process on a loaded day: the
 * day is read and checked once, then each round builds a fresh calculator, computes the figures
 * (as the daily job does beside the checks), marks them and reconciles the vendor's figures.
 * Prints wall and CPU seconds of each part per round, and a hash of the answers so two builds
 * can be compared.
 *
 *   node dist/bench/figures-bench.js CONFIG [rounds]
 */
import { createHash } from 'node:crypto';
import { lastMonthEndOnOrBefore } from '../src/calendar/days.js';
import { loadRunConfig } from '../src/config/run-config.js';
import { loadOptionsOf } from '../src/job/daily-job.js';
import { loadDay } from '../src/job/day.js';
import { checkStage } from '../src/job/stages/checks.js';
import { computeFigures, markFigures } from '../src/job/stages/metrics.js';
import { reconcileStage } from '../src/job/stages/reconcile.js';
import { MetricCalculator } from '../src/metrics/compute.js';
import { parseAsOf } from '../src/cli/options.js';

const configPath = process.argv[2];
const rounds = Number(process.argv[3] ?? 3);
process.chdir(configPath.replace(/\/[^/]+$/, ''));
const config = loadRunConfig(configPath.replace(/^.*\//, ''));
const asOf = parseAsOf(config.as_of);
const loaded = await loadDay({ paths: config.paths, asOf, load: loadOptionsOf(config, asOf) });
const check = await checkStage(loaded, config.checks, { threads: 2 });
const figureRequest = { asOf: lastMonthEndOnOrBefore(asOf), windows: config.windows, methodology: config.methodology };

/** With BENCH_MARKS set, each part's start is printed, to read with --trace-gc. */
const marks = process.env.BENCH_MARKS !== undefined;

function timed<T>(work: () => T): { result: T; wall: number; cpu: number } {
  if (marks) console.log(`--- ${work.toString().slice(6, 40)}`);
  const t0 = process.hrtime.bigint();
  const cpu0 = process.cpuUsage();
  const result = work();
  const used = process.cpuUsage(cpu0);
  return { result, wall: Number(process.hrtime.bigint() - t0) / 1e9, cpu: (used.user + used.system) / 1e6 };
}

for (let round = 0; round < rounds; round++) {
  const day = { ...loaded, figures: loaded.figures && { inputs: loaded.figures.inputs, calculator: new MetricCalculator(loaded.figures.inputs) } };
  const figures = timed(() => computeFigures(day, figureRequest));
  const marked = timed(() => markFigures(day, figures.result, check.findings));
  const reconciled = timed(() => reconcileStage(day, check.findings, { methodology: config.methodology, tolerances: config.reconcile.tolerances, through: asOf }));
  const hash = createHash('sha256').update(JSON.stringify(marked.result)).update(JSON.stringify(reconciled.result)).digest('hex').slice(0, 16);
  const seconds = (part: { wall: number; cpu: number }) => `${part.wall.toFixed(3)} s (CPU ${part.cpu.toFixed(3)})`;
  console.log(`round ${round + 1}: figures ${seconds(figures)}, marks ${seconds(marked)}, reconcile ${seconds(reconciled)}; answers ${hash}`);
}
