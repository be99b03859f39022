/**
 * The whole daily audit of the standard universe (bench/standard-universe.ts), each run a fresh
 * child process (bench/audit-child.ts) with a clean store and report folder, several times per
 * size. Prints per-stage seconds (median and best), NAV rows/s and MB/s of ingestion, the whole
 * process's wall time and its peak resident memory, with the machine and the run count. Then the
 * same audit on "day two", as a team runs it every day: the store already holds the previous
 * business day's snapshot, which the run loads and compares with (restated history). Then the
 * same audit from the Arrow snapshot the first run stored.
 *
 *   npm run build && node dist/bench/audit-bench.js                 # 10,000 series × 10 years, 3 runs
 *   node dist/bench/audit-bench.js --sizes 1000,5000,10000,20000 --years 10 --runs 3
 *   node dist/bench/audit-bench.js --sizes 2000 --runs 1 --no-arrow --node-arg --cpu-prof
 *
 * Options: --sizes (series counts), --years, --runs, --no-day-two, --no-arrow, --cache DIR (where the universe
 * is kept), --node-arg ARG (passed to node for the child), --child-arg ARG (passed to the child,
 * e.g. `--child-arg --threads --child-arg 1`).
 *
 * The generated files are kept under bench/.cache/ (gitignored), so later runs do not regenerate.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, linkSync, mkdirSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, totalmem } from 'node:os';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { ChildReport } from './audit-child.js';
import { AS_OF, LARGEST_BENCH_INPUT, STANDARD_SIZE, standardUniverse, type StandardUniverse } from './standard-universe.js';
import { formatIsoDate } from '../src/calendar/days.js';
import { startAgain } from '../src/cli/huge-pages.js';

const here = dirname(fileURLToPath(import.meta.url));
/** bench/.cache at the repository root, whether this runs from bench/ (tsx) or dist/bench/ (built). */
const repositoryRoot = here.includes(`${join('dist', 'bench')}`) ? resolve(here, '..', '..') : resolve(here, '..');
const child = join(here, `audit-child${import.meta.url.endsWith('.ts') ? '.ts' : '.js'}`);

const args = process.argv.slice(2);
const USAGE = `usage: node dist/bench/audit-bench.js [--sizes N,N,…] [--years Y] [--runs R] [--no-day-two] [--no-arrow] [--cache DIR]
                                     [--node-arg ARG]… [--child-arg ARG]…
  --sizes      series counts of the standard universe (default ${STANDARD_SIZE.series})
  --years      years of business days (default ${STANDARD_SIZE.years})
  --runs       fresh processes per size; medians and bests are printed (default 3)
  --no-day-two skip the audit with the previous business day's snapshot in the store
  --no-arrow   skip the audit from the Arrow snapshot the first run stored
  --cache      where generated universes are kept (default bench/.cache)
  --node-arg   passed to node for each run, e.g. --node-arg --cpu-prof
  --child-arg  passed to the audit child, e.g. --child-arg --threads --child-arg 1`;
if (args.includes('--help') || args.includes('-h')) {
  console.log(USAGE);
  process.exit(0);
}
const option = (name: string, fallback: string): string => {
  const i = args.indexOf(name);
  return i >= 0 && i + 1 < args.length ? args[i + 1] : fallback;
};
const cacheDir = resolve(option('--cache', join(repositoryRoot, 'bench', '.cache')));
const sizes = option('--sizes', String(STANDARD_SIZE.series)).split(',').map(Number);
const years = Number(option('--years', String(STANDARD_SIZE.years)));
const runs = Number(option('--runs', '3'));
const withArrow = !args.includes('--no-arrow');
const withDayTwo = !args.includes('--no-day-two');
const extra = args.flatMap((a, i) => (a === '--child-arg' ? [args[i + 1]] : []));
const nodeArgs = args.flatMap((a, i) => (a === '--node-arg' ? [args[i + 1]] : []));
/**
 * The child runs as the executable would start it: with huge pages asked for and the engine's
 * settings (src/cli/huge-pages.ts, src/cli/engine-flags.ts), where the executable starts itself again.
 */
const again = startAgain(process.env, process.platform, nodeArgs);
const childEnvironment = again?.env ?? process.env;
const childNodeOptions = again?.nodeOptions ?? nodeArgs;

const median = (values: number[]) => {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
};
const best = (values: number[]) => Math.min(...values);

/** Where each stage that runs beside others is timed (bench/audit-child.ts). */
const BESIDE: Record<string, string> = {
  figures: 'computed on the main thread while the check workers run, inside the checks row; the metrics row is their marks',
  store: 'the snapshot written on its own thread from the end of the checks; the store row is the wait left after the reports',
};

console.log(`navassay audit bench: the whole daily audit in a fresh process per run, ${runs} run${runs === 1 ? '' : 's'} per size, warm page cache`);
console.log(`machine: ${cpus()[0]?.model.trim() ?? 'unknown cpu'}, ${cpus().length} cores, ${(totalmem() / 2 ** 30).toFixed(1)} GiB, Node ${process.version}; load average at start ${loadavg().map((l) => l.toFixed(1)).join(' ')}`);
console.log(`date: ${new Date().toISOString().slice(0, 16)}Z; child options: ${[...childNodeOptions, ...extra].join(' ') || 'none'}`);

interface Scenario {
  readonly label: string;
  readonly config: string;
  readonly inputBytes: number;
  /** A stored snapshot put in the run's store before each run, as the previous business day's. */
  readonly previous?: StoredPrevious;
}

interface StoredPrevious {
  readonly asOf: string;
  /** A snapshot directory, linked file by file into the store. */
  readonly dir: string;
}

for (const series of sizes) {
  const universe = await standardUniverse(cacheDir, { series, years }, (line) => console.log(line));
  const csv = scenario(universe, 'csv', csvFiles(universe));
  const results = measure(csv, universe);
  print(csv, universe, results);
  if (withDayTwo) {
    const dayTwo = scenario(universe, 'csv-day-two', csvFiles(universe), previousDay(universe, join(dirname(csv.config), 'store')));
    print(dayTwo, universe, measure(dayTwo, universe));
  }
  if (withArrow) {
    const arrow = scenario(universe, 'arrow', arrowFiles(universe, join(dirname(csv.config), 'store')));
    print(arrow, universe, measure(arrow, universe));
  }
}

function csvFiles(universe: StandardUniverse): Record<string, string> {
  return { ...universe.files };
}

/** The Arrow files of the snapshot the CSV runs stored, copied beside the universe. */
function arrowFiles(universe: StandardUniverse, store: string): Record<string, string> {
  const feedDir = join(store, 'bench');
  const snapshot = join(feedDir, formatIsoDate(AS_OF));
  const target = join(universe.dir, 'arrow');
  mkdirSync(target, { recursive: true });
  const files: Record<string, string> = {};
  for (const name of readdirSync(snapshot).filter((n) => n.endsWith('.arrow'))) {
    copyFileSync(join(snapshot, name), join(target, name));
    files[name.replace('.arrow', '')] = join(target, name);
  }
  return files;
}

/**
 * The snapshot the CSV runs stored, kept beside the universe as the previous business day's
 * (2026-11-27, the Friday before the as-of Monday): the same tables, so the restated-history
 * comparison reads every row and finds nothing, which is its usual day.
 */
function previousDay(universe: StandardUniverse, store: string): StoredPrevious {
  const asOf = formatIsoDate(AS_OF - 3);
  const stored = join(store, 'bench', formatIsoDate(AS_OF));
  const dir = join(universe.dir, 'previous-snapshot', asOf);
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  for (const name of readdirSync(stored)) {
    if (name === 'manifest.json') continue;
    copyFileSync(join(stored, name), join(dir, name));
  }
  const manifest = JSON.parse(readFileSync(join(stored, 'manifest.json'), 'utf8')) as { as_of: string };
  writeFileSync(join(dir, 'manifest.json'), JSON.stringify({ ...manifest, as_of: asOf }, null, 2));
  return { asOf, dir };
}

function scenario(universe: StandardUniverse, label: string, files: Record<string, string>, previous?: StoredPrevious): Scenario {
  const dir = join(universe.dir, `run-${label}`);
  mkdirSync(dir, { recursive: true });
  const config = join(dir, 'navassay.yaml');
  const lines = [`feed: bench`, `as_of: ${formatIsoDate(AS_OF)}`, 'store: store', 'files:'];
  for (const [kind, path] of Object.entries(files)) lines.push(`  ${kind}: ${relative(dir, path)}`);
  lines.push('windows: [1y, 3y, 5y]', 'output:', '  dir: report', '  formats: [json, html]', 'fail_on: none', 'limits:', `  max_input_bytes: ${LARGEST_BENCH_INPUT}`, '');
  writeFileSync(config, lines.join('\n'));
  const inputBytes = Object.values(files).reduce((sum, path) => sum + statSync(path).size, 0);
  return { label, config, inputBytes, previous };
}

interface Run {
  readonly report: ChildReport;
  /** Wall seconds of the whole child process, start-up included. */
  readonly wall: number;
}

function measure(scenario: Scenario, universe: StandardUniverse): Run[] {
  const results: Run[] = [];
  for (let run = 0; run < runs; run++) {
    const dir = dirname(scenario.config);
    rmSync(join(dir, 'store'), { recursive: true, force: true });
    rmSync(join(dir, 'report'), { recursive: true, force: true });
    if (scenario.previous) linkPrevious(scenario.previous, join(dir, 'store', 'bench', scenario.previous.asOf));
    const t0 = process.hrtime.bigint();
    const loader = child.endsWith('.ts') ? ['--import', 'tsx'] : [];
    const out = spawnSync(process.execPath, [...loader, ...childNodeOptions, child, scenario.config, ...extra], { encoding: 'utf8', maxBuffer: 1 << 26, cwd: repositoryRoot, env: childEnvironment });
    const wall = Number(process.hrtime.bigint() - t0) / 1e9;
    if (out.status !== 0) throw new Error(`audit child failed on ${universe.size.series} series (${scenario.label}): ${out.stderr}`);
    const lines = out.stdout.trim().split('\n');
    results.push({ report: JSON.parse(lines[lines.length - 1]) as ChildReport, wall });
  }
  // The CSV scenario's store must survive for the Arrow scenario, so only the report folder goes.
  return results;
}

function scenarioTitle(scenario: Scenario, report: ChildReport): string {
  const [input] = scenario.label.split('-');
  if (!scenario.previous) return input.toUpperCase();
  return `${input.toUpperCase()} on day two (the store holds ${scenario.previous.asOf}'s snapshot: ${(report.previousRows ?? 0).toLocaleString('en')} NAV rows loaded and compared)`;
}

/** The previous day's snapshot in a fresh store, by hard links: a run only reads it. */
function linkPrevious(previous: StoredPrevious, target: string): void {
  mkdirSync(target, { recursive: true });
  for (const name of readdirSync(previous.dir)) linkSync(join(previous.dir, name), join(target, name));
}

function print(scenario: Scenario, universe: StandardUniverse, results: Run[]): void {
  const first = results[0].report;
  const rows = first.navRows;
  console.log(
    `\n${universe.size.series.toLocaleString('en')} series × ${universe.size.years}y from ${scenarioTitle(scenario, first)}: ${rows.toLocaleString('en')} NAV rows, ${(scenario.inputBytes / 2 ** 20).toFixed(0)} MiB of input, ` +
      `${first.rowsRead.toLocaleString('en')} rows read in all, ${first.findings.toLocaleString('en')} findings, ${first.figures.toLocaleString('en')} figures; ${first.threads} check thread${first.threads === 1 ? '' : 's'}`,
  );
  for (const note of first.skipped) console.log(`  skipped: ${note}`);
  const stageNames = Object.keys(first.stages).filter((s) => s !== 'total');
  for (const name of [...stageNames, 'total']) {
    const seconds = results.map((r) => r.report.stages[name]);
    let rate = '';
    if (name === 'ingest') rate = `  ${(rows / median(seconds) / 1e6).toFixed(2)} M NAV rows/s, ${(scenario.inputBytes / median(seconds) / 1e6).toFixed(0)} MB/s (median)${scenario.previous ? ", yesterday's snapshot included" : ''}`;
    const cpu = results.map((r) => r.report.cpu[name]);
    console.log(`  ${name.padEnd(10)} median ${median(seconds).toFixed(2).padStart(7)} s   best ${best(seconds).toFixed(2).padStart(7)} s   CPU median ${median(cpu).toFixed(2).padStart(7)} s${rate}`);
  }
  const walls = results.map((r) => r.wall);
  const rss = results.map((r) => r.report.maxRssBytes / 2 ** 20);
  console.log(`  ${'process'.padEnd(10)} median ${median(walls).toFixed(2).padStart(7)} s   best ${best(walls).toFixed(2).padStart(7)} s  (whole child process, start-up included)`);
  console.log(`  ${'peak RSS'.padEnd(10)} median ${median(rss).toFixed(0).padStart(7)} MiB best ${best(rss).toFixed(0).padStart(7)} MiB`);
  for (const name of Object.keys(first.background ?? {})) {
    const seconds = results.map((r) => r.report.background?.[name] ?? NaN);
    console.log(`  ${name.padEnd(10)} ${median(seconds).toFixed(2).padStart(7)} s beside other stages (median): ${BESIDE[name] ?? 'on another thread'}`);
  }
  const peaks = stageNames.map((name) => `${name} ${median(results.map((r) => r.report.peakAfter[name] / 2 ** 20)).toFixed(0)}`);
  console.log(`  ${'peak after'.padEnd(10)} ${peaks.join(', ')} MiB (median; the stage where it rises set the peak)`);
}
