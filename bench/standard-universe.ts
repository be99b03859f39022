/**
 * The standard universe of the audit bench, written as the canonical CSV files a daily run reads:
 * `series` share classes (10,000 by default) × `years` of business days (10), 20 benchmarks,
 * one daily risk-free rate, a master, two holiday calendars and a vendor's figures for every
 * series × 1y/3y/5y × six metrics. A sprinkle of faults (stale runs, unit jumps, gaps, duplicates,
 * unreadable rows) and vendor slips (sign, percent labelled as decimal) makes every check and the
 * reconciliation do real work. Every name is invented.
 *
 * The files are cached on disk (`bench/.cache/`, gitignored): a second bench run with the same
 * sizes reuses them. Generation is deterministic (seeded), so a cached folder and a fresh one
 * hold the same bytes.
 */
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, renameSync, rmSync, writeFileSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { epochDay, formatIsoDate, isoWeekday, lastMonthEndOnOrBefore } from '../src/calendar/days.js';
import { loadFeed } from '../src/ingest/feed.js';
import { readLimits } from '../src/ingest/limits.js';
import { computeMetrics } from '../src/metrics/compute.js';
import { DEFAULT_METHODOLOGY } from '../src/metrics/methodology.js';
import { SeededRandom } from '../src/random.js';
import type { MetricId } from '../src/ingest/schema.js';

export interface StandardUniverseSize {
  readonly series: number;
  readonly years: number;
}

export const STANDARD_SIZE: StandardUniverseSize = { series: 10_000, years: 10 };
export const AS_OF = epochDay(2026, 11, 30);
/** Bump when the generator changes, so stale cached folders are not reused. */
const GENERATOR_VERSION = 1;
const BENCHMARK_COUNT = 20;
const VENDOR_METRICS: readonly MetricId[] = ['return_annualized', 'std_dev', 'beta', 'r_squared', 'sharpe', 'max_drawdown'];
const WINDOWS = ['1y', '3y', '5y'];
const CALENDARS = {
  LINDQUIST: [[1, 1], [5, 1], [12, 25], [12, 26]],
  ORMSBY: [[1, 1], [3, 17], [8, 15], [12, 25]],
} as const;

export interface StandardUniverse {
  readonly dir: string;
  readonly size: StandardUniverseSize;
  /** Canonical file paths by kind. */
  readonly files: Readonly<Record<'nav' | 'benchmarks' | 'master' | 'rates' | 'holidays' | 'vendor', string>>;
  readonly navRows: number;
}

/**
 * The NAV file outgrows the readers' default 1 GiB limit from about 14,000 series (20,000 series
 * × 10 years is 1.5 GiB), so the bench raises it to what Node.js can read, as a team with such a
 * universe would in its configuration (`limits.max_input_bytes`).
 */
export const LARGEST_BENCH_INPUT = 2 ** 31 - 1;

export function universeDir(cacheDir: string, size: StandardUniverseSize): string {
  return join(cacheDir, `universe-v${GENERATOR_VERSION}-${size.series}x${size.years}y`);
}

/** The universe of `size`, generated into `cacheDir` unless a complete copy is already there. */
export async function standardUniverse(cacheDir: string, size: StandardUniverseSize, log: (line: string) => void = () => {}): Promise<StandardUniverse> {
  const dir = universeDir(cacheDir, size);
  const files = {
    nav: join(dir, 'nav.csv'),
    benchmarks: join(dir, 'benchmarks.csv'),
    master: join(dir, 'master.csv'),
    rates: join(dir, 'rates.csv'),
    holidays: join(dir, 'holidays.csv'),
    vendor: join(dir, 'vendor.csv'),
  };
  const done = join(dir, 'complete');
  if (existsSync(done)) return { dir, size, files, navRows: Number(readFileSync(done, 'utf8')) };
  log(`generating the ${size.series} × ${size.years}y universe into ${dir} (once; later runs reuse it)`);
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  const days = weekdays(size.years);
  const holidays = holidayDays(days);
  writeFileSync(files.holidays, ['calendar,date', ...[...holidays].flatMap(([name, set]) => [...set].sort((a, b) => a - b).map((d) => `${name},${formatIsoDate(d)}`)), ''].join('\n'));
  const random = new SeededRandom(20261130 + size.series);
  const market = benchmarkReturns(random, days.length);
  writeFileSync(files.benchmarks, benchmarkFile(days, market));
  writeFileSync(files.rates, ratesFile(days));
  writeFileSync(files.master, masterFile(size.series, days[0]));
  const navRows = writeNavFile(files.nav, size.series, days, market, holidays, random);
  // Vendor figures: what the default methodology gives, rounded as a vendor prints, with slips.
  const feed = await loadFeed(
    { nav: files.nav, benchmarks: files.benchmarks, master: files.master, rates: files.rates, holidays: files.holidays },
    { limits: readLimits({ max_input_bytes: LARGEST_BENCH_INPUT }, AS_OF) },
  );
  const figures = computeMetrics({ nav: feed.nav, benchmarks: feed.benchmarks!, master: feed.master!, rates: feed.rates, asOf: lastMonthEndOnOrBefore(AS_OF), windows: WINDOWS, methodology: DEFAULT_METHODOLOGY, metrics: VENDOR_METRICS }).metrics;
  writeFileSync(files.vendor, vendorFile(figures, random));
  writeFileSync(done, String(navRows));
  return { dir, size, files, navRows };
}

export function seriesName(index: number): string {
  return `BVF${String(index + 1).padStart(6, '0')}`;
}

function benchmarkName(index: number): string {
  return `QUILLMARK-${String(index + 1).padStart(2, '0')}`;
}

function weekdays(years: number): number[] {
  const days: number[] = [];
  for (let day = AS_OF - Math.round(years * 365.25) + 1; day <= AS_OF; day++) if (isoWeekday(day) <= 5) days.push(day);
  return days;
}

function holidayDays(days: number[]): Map<string, Set<number>> {
  const first = new Date(days[0] * 86400000).getUTCFullYear();
  const last = new Date(days[days.length - 1] * 86400000).getUTCFullYear();
  const byCalendar = new Map<string, Set<number>>();
  for (const [name, dates] of Object.entries(CALENDARS)) {
    const set = new Set<number>();
    for (let year = first; year <= last; year++) for (const [month, dom] of dates) set.add(epochDay(year, month, dom));
    byCalendar.set(name, set);
  }
  return byCalendar;
}

function benchmarkReturns(random: SeededRandom, length: number): Float64Array[] {
  const common = Float64Array.from({ length }, () => 0.009 * random.normal());
  return Array.from({ length: BENCHMARK_COUNT }, (_, b) => {
    const loading = 0.4 + (b % 7) * 0.12;
    return Float64Array.from(common, (m) => 0.0002 + loading * m + 0.004 * random.normal());
  });
}

function benchmarkFile(days: number[], market: Float64Array[]): string {
  const lines = ['benchmark_id,date,level'];
  market.forEach((returns, b) => {
    let level = 1000 + 37 * b;
    days.forEach((day, i) => {
      level *= 1 + returns[i];
      lines.push(`${benchmarkName(b)},${formatIsoDate(day)},${level.toFixed(4)}`);
    });
  });
  return lines.join('\n') + '\n';
}

function ratesFile(days: number[]): string {
  return ['rate_id,date,rate', ...days.map((day, i) => `RF-TALLOW,${formatIsoDate(day)},${(0.01 + 0.02 * Math.abs(Math.sin(i / 300))).toFixed(5)}`), ''].join('\n');
}

function calendarOf(s: number): 'LINDQUIST' | 'ORMSBY' {
  return s % 5 === 4 ? 'ORMSBY' : 'LINDQUIST';
}

function masterFile(series: number, inception: number): string {
  const categories = ['equity', 'equity', 'mixed', 'bond', 'equity index'];
  const lines = ['series_id,benchmark_id,name,category,currency,calendar,rate_id,stable_value,inception'];
  for (let s = 0; s < series; s++) {
    lines.push(`${seriesName(s)},${benchmarkName(s % BENCHMARK_COUNT)},Tallowmere Fund ${s + 1},${categories[s % categories.length]},EUR,${calendarOf(s)},RF-TALLOW,false,${formatIsoDate(inception)}`);
  }
  return lines.join('\n') + '\n';
}

/** Which fault, if any, a series carries: about one series in 250 per kind. */
function faultOf(s: number): 'stale' | 'cents' | 'gap' | 'duplicate' | 'unreadable' | 'spike' | null {
  const kinds = ['stale', 'cents', 'gap', 'duplicate', 'unreadable', 'spike'] as const;
  return s % 250 === 17 ? kinds[Math.floor(s / 250) % kinds.length] : null;
}

/** Writes the NAV file series by series (one buffer per series keeps memory flat); returns its data rows. */
function writeNavFile(path: string, series: number, days: number[], market: Float64Array[], holidays: Map<string, Set<number>>, random: SeededRandom): number {
  const isoDays = days.map(formatIsoDate);
  const partial = `${path}.partial`;
  const fd = openSync(partial, 'w');
  writeSync(fd, 'series_id,date,nav\n');
  let rows = 0;
  for (let s = 0; s < series; s++) {
    const id = seriesName(s);
    const off = holidays.get(calendarOf(s))!;
    const bench = market[s % BENCHMARK_COUNT];
    const beta = 0.7 + (s % 11) * 0.05;
    const noise = 0.001 + (s % 13) * 0.0003;
    const fault = faultOf(s);
    const faultAt = days.length - 40 - (s % 200);
    let nav = 10 + (s % 190);
    let lines = '';
    for (let i = 0; i < days.length; i++) {
      nav *= 1 + 0.00005 + beta * bench[i] + noise * random.normal();
      if (off.has(days[i])) continue;
      let value = nav;
      if (fault === 'stale' && i > faultAt && i <= faultAt + 8) continue; // written below as repeats
      if (fault === 'gap' && i >= faultAt && i < faultAt + 4) continue;
      if (fault === 'cents' && i >= faultAt) value = nav * 100;
      if (fault === 'spike' && i === faultAt) value = nav * 1.09;
      lines += `${id},${isoDays[i]},${value.toFixed(4)}\n`;
      rows++;
      if (fault === 'stale' && i === faultAt) {
        for (let k = 1; k <= 8 && i + k < days.length; k++) if (!off.has(days[i + k])) (lines += `${id},${isoDays[i + k]},${value.toFixed(4)}\n`), rows++;
      }
      if (fault === 'duplicate' && i === faultAt) (lines += `${id},${isoDays[i]},${(value * 1.004).toFixed(4)}\n`), rows++;
      if (fault === 'unreadable' && i === faultAt) (lines += `${id},${isoDays[i].replace('0', 'O')},${value.toFixed(4)}\n`), rows++;
    }
    writeSync(fd, lines);
  }
  closeSync(fd);
  renameSync(partial, path);
  return rows;
}

interface Figure {
  readonly series_id: string;
  readonly window: string;
  readonly metric: MetricId;
  readonly value: number | null;
}

/** A vendor's file: every figure printed to its precision; one in 400 carries a slip. */
function vendorFile(figures: readonly Figure[], random: SeededRandom): string {
  const asOf = formatIsoDate(lastMonthEndOnOrBefore(AS_OF));
  const lines = ['series_id,as_of,window,metric,value,unit'];
  for (const f of figures) {
    if (f.value === null) continue;
    const ratio = f.metric === 'beta' || f.metric === 'r_squared' || f.metric === 'sharpe';
    let text = ratio ? f.value.toFixed(2) : f.value.toFixed(4);
    const slip = random.int(400);
    if (slip === 0) text = (-f.value).toFixed(4); // a sign lost on the way
    else if (slip === 1) text = (f.value * 100).toFixed(2); // percent labelled as decimal
    lines.push(`${f.series_id},${asOf},${f.window},${f.metric},${text},decimal`);
  }
  return lines.join('\n') + '\n';
}
