import { parseIsoDate } from '../calendar/days.js';
import type { Finding } from '../findings.js';
import { frameFromSeries, findSeries, type SeriesFrame } from '../series/frame.js';

/**
 * Suspect values repaired the way the check that found them knows how, so that reconciliation
 * can ask "does the vendor's figure come from the repaired data?":
 *
 * - `split_like_jump` (no action on file): the NAVs before the jump are scaled by the jump's
 *   simple ratio, as if the split or change of quoting unit had been announced;
 * - `spike_reversal`: the spike's NAV is replaced by the geometric mean of its neighbours.
 *
 * Other findings (stale runs, shifted dates …) have no repair that does not invent data.
 */
export interface Repair {
  /** What was changed, in words for the report. */
  readonly description: string;
  /** The series' NAVs after the repair, as a one-series frame. */
  readonly nav: SeriesFrame;
}

type Repairer = (finding: Finding, dates: Int32Array, values: Float64Array) => string | null;

const REPAIRERS: Readonly<Record<string, Repairer>> = {
  split_like_jump: repairSplitLikeJump,
  spike_reversal: repairSpike,
};

export function repairFor(finding: Finding, nav: SeriesFrame): Repair | null {
  const repairer = REPAIRERS[finding.check];
  const series = finding.series_id === null ? undefined : findSeries(nav, finding.series_id);
  if (!repairer || !series) return null;
  const values = series.values.slice();
  const description = repairer(finding, series.dates, values);
  if (description === null) return null;
  return { description, nav: frameFromSeries([{ id: series.id, dates: series.dates, values }]) };
}

function repairSplitLikeJump(finding: Finding, dates: Int32Array, values: Float64Array): string | null {
  const ratio = Number(finding.evidence.nearest_simple_ratio);
  const day = dateOf(finding.evidence.current);
  if (!(ratio > 0) || day === null) return null;
  let changed = 0;
  for (let i = 0; i < dates.length && dates[i] < day; i++, changed++) values[i] *= ratio;
  return changed === 0 ? null : `NAVs before ${isoOf(finding.evidence.current)} multiplied by ${ratio}, as if the jump had been announced`;
}

function repairSpike(finding: Finding, dates: Int32Array, values: Float64Array): string | null {
  const spike = indexOf(dates, dateOf(finding.evidence.spike));
  if (spike <= 0 || spike + 1 >= dates.length) return null;
  values[spike] = Math.sqrt(values[spike - 1] * values[spike + 1]);
  return `NAV of ${isoOf(finding.evidence.spike)} replaced by the geometric mean of its neighbours (${round(values[spike])})`;
}

function dateOf(point: unknown): number | null {
  const text = isoOf(point);
  return text === null ? null : parseIsoDate(text);
}

function isoOf(point: unknown): string | null {
  const date = (point as { date?: unknown } | undefined)?.date;
  return typeof date === 'string' ? date : null;
}

function indexOf(dates: Int32Array, day: number | null): number {
  if (day === null) return -1;
  for (let i = 0; i < dates.length; i++) if (dates[i] === day) return i;
  return -1;
}

function round(value: number): number {
  return Math.round(value * 1e6) / 1e6;
}
