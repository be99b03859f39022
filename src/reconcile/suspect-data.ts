import { monthEndDay, parseIsoDate } from '../calendar/days.js';
import { severityRank, type Finding } from '../findings.js';
import type { SeriesMasterRecord } from '../ingest/records.js';
import { needsBenchmark, type MetricId } from '../metrics/kernels.js';
import type { MetricRow, MetricsAnswer } from '../metrics/compute.js';
import { monthStartDay, parseWindow, windowMonths } from '../metrics/windows.js';

/**
 * Figures computed on suspect data: a window that holds an error-level finding of the checks
 * (an unannounced split, a spike, shifted dates …) gives a figure nobody should publish before
 * the data is fixed, however well navassay and the vendor agree on it.
 */

/** Findings about the vendor's own file say nothing about the data a figure is computed from. */
const NOT_ABOUT_DATA = new Set(['vendor_inconsistent']);

/** No finding: one shared empty list, never written. */
const NONE: readonly Finding[] = [];

/** The error-level findings of each series (or benchmark), for window look-ups. */
export class SuspectData {
  private readonly bySeries = new Map<string, Array<{ finding: Finding; first: number; last: number }>>();

  constructor(findings: readonly Finding[]) {
    for (const finding of findings) {
      if (severityRank(finding.severity) < severityRank('error') || NOT_ABOUT_DATA.has(finding.check)) continue;
      if (finding.series_id === null || finding.start === null) continue;
      const first = parseIsoDate(finding.start);
      const last = parseIsoDate(finding.end ?? finding.start);
      if (first === null || last === null) continue;
      const list = this.bySeries.get(finding.series_id) ?? [];
      list.push({ finding, first, last });
      this.bySeries.set(finding.series_id, list);
    }
  }

  /** Error-level findings on any of the ids whose dates meet the span (epoch days, inclusive). */
  within(ids: ReadonlyArray<string | null>, span: DaySpan): Finding[] {
    const found: Finding[] = [];
    for (const id of ids) {
      if (id === null) continue;
      for (const entry of this.bySeries.get(id) ?? []) if (entry.first <= span.last && entry.last >= span.first) found.push(entry.finding);
    }
    return found;
  }

  /** The findings a figure's window holds: the series', and its benchmark's for a benchmark figure. */
  forFigure(seriesId: string, benchmarkId: string | null, metric: MetricId, span: DaySpan | null): readonly Finding[] {
    if (span === null) return NONE;
    const withBenchmark = needsBenchmark(metric);
    // Most figures' series and benchmark have no error-level finding: answer those without building lists.
    if (!this.bySeries.has(seriesId) && !(withBenchmark && benchmarkId !== null && this.bySeries.has(benchmarkId))) return NONE;
    return this.within(withBenchmark ? [seriesId, benchmarkId] : [seriesId], span);
  }
}

export interface DaySpan {
  readonly first: number;
  readonly last: number;
}

/**
 * The days a window's data comes from: the first day of the month holding its first month-end
 * value, to the as-of day or its window's last month-end, whichever is earlier.
 */
export function windowDaySpan(asOf: number, window: string, windowEnd = 0): DaySpan | null {
  const months = parseWindow(window);
  if (months === null) return null;
  const span = windowMonths(asOf, months, windowEnd);
  return { first: monthStartDay(span.startMonth), last: Math.min(asOf, monthEndDay(span.endMonth)) };
}

/**
 * The metrics answer with `suspect_data` (the finding keys) on each figure whose window holds an
 * error-level finding. Additive: figures on clean data are unchanged.
 */
export function markSuspectFigures(answer: MetricsAnswer, findings: readonly Finding[], master: readonly SeriesMasterRecord[]): MetricsAnswer {
  const suspects = new SuspectData(findings);
  const asOf = parseIsoDate(answer.as_of)!;
  const benchmarkOf = new Map(master.map((record) => [record.series_id, record.benchmark_id]));
  const spans = new Map<string, DaySpan | null>();
  const metrics = answer.metrics.map((row): MetricRow => {
    if (!spans.has(row.window)) spans.set(row.window, windowDaySpan(asOf, row.window, answer.methodology.window_end));
    const benchmark = answer.methodology.benchmark ?? benchmarkOf.get(row.series_id) ?? null;
    const found = suspects.forFigure(row.series_id, benchmark, row.metric, spans.get(row.window)!);
    return found.length === 0 ? row : { ...row, suspect_data: found.map((finding) => finding.key) };
  });
  return { ...answer, metrics };
}
