import { formatIsoDate, parseIsoDate } from '../../calendar/days.js';
import { severityRank, type Finding, type Severity } from '../../findings.js';
import { findSeries, type SeriesFrame } from '../../series/frame.js';

/** What a NAV chart shows: the series, its benchmark rebased to the series' first value, and the flagged dates. */
export interface NavChart {
  readonly series_id: string;
  readonly benchmark_id: string | null;
  readonly points: ReadonlyArray<readonly [string, number]>;
  readonly benchmark: ReadonlyArray<readonly [string, number]>;
  readonly marks: ReadonlyArray<{ readonly start: string; readonly end: string; readonly severity: Severity; readonly check: string }>;
}

/** A year of history, stretched back (at most three years) to show an older flagged date. */
const DAYS_SHOWN = 366;
const DAYS_SHOWN_AT_MOST = 3 * 366;
/** Points per line at most: enough for a 640-pixel-wide chart. */
const POINTS_AT_MOST = 320;

export function navChart(
  nav: SeriesFrame,
  benchmarks: SeriesFrame | undefined,
  seriesId: string,
  benchmarkId: string | null,
  findings: readonly Finding[],
  asOf: number,
): NavChart | null {
  const series = findSeries(nav, seriesId);
  if (!series || series.dates.length < 2) return null;
  const own = findings.filter((f) => f.series_id === seriesId && f.start !== null);
  const earliestMark = Math.min(...own.map((f) => parseIsoDate(f.start!) ?? asOf), asOf);
  const from = Math.max(asOf - DAYS_SHOWN_AT_MOST, Math.min(asOf - DAYS_SHOWN, earliestMark - 30));
  const points: Array<[string, number]> = [];
  const pointDays: number[] = [];
  for (let i = 0; i < series.dates.length; i++) {
    const day = series.dates[i];
    if (day < from || day > asOf || !(series.values[i] > 0)) continue;
    points.push([formatIsoDate(day), series.values[i]]);
    pointDays.push(day);
  }
  if (points.length < 2) return null;
  const marks = own
    .filter((f) => f.end! >= points[0][0] && f.start! <= points[points.length - 1][0])
    .map((f) => ({ start: f.start!, end: f.end ?? f.start!, severity: f.severity, check: f.check }))
    .sort((a, b) => severityRank(a.severity) - severityRank(b.severity));
  const markedDays = new Set(marks.flatMap((m) => [m.start, m.end]));
  return {
    series_id: seriesId,
    benchmark_id: benchmarkId,
    points: thin(points, markedDays),
    benchmark: rebasedBenchmark(benchmarks, benchmarkId, points),
    marks,
  };
}

function rebasedBenchmark(benchmarks: SeriesFrame | undefined, benchmarkId: string | null, points: ReadonlyArray<readonly [string, number]>): Array<[string, number]> {
  const benchmark = benchmarkId && benchmarks ? findSeries(benchmarks, benchmarkId) : undefined;
  if (!benchmark) return [];
  const first = points[0][0];
  const last = points[points.length - 1][0];
  const rows: Array<[string, number]> = [];
  for (let i = 0; i < benchmark.dates.length; i++) {
    const date = formatIsoDate(benchmark.dates[i]);
    if (date >= first && date <= last && benchmark.values[i] > 0) rows.push([date, benchmark.values[i]]);
  }
  if (rows.length === 0) return [];
  // Rebased to the fund's value on the first date both have (or the benchmark's first date).
  const base = points.find(([date]) => date >= rows[0][0]) ?? points[0];
  const scale = base[1] / rows[0][1];
  return thin(rows.map(([date, value]) => [date, value * scale]), new Set());
}

/** Every k-th point, always keeping the ends and the marked dates. */
function thin(points: Array<[string, number]>, keep: ReadonlySet<string>): Array<[string, number]> {
  if (points.length <= POINTS_AT_MOST) return points;
  const step = Math.ceil(points.length / POINTS_AT_MOST);
  return points.filter(([date], i) => i % step === 0 || i === points.length - 1 || keep.has(date));
}
