import { formatIsoDate, monthEndDay, monthIndex, parseIsoDate } from '../../calendar/days.js';
import { severityRank, type Finding } from '../../findings.js';
import type { MetricRow } from '../../metrics/compute.js';
import { parseWindow } from '../../metrics/windows.js';

/**
 * A figure a person can trust at a glance: one computed on a series with an error-level (or
 * worse) finding inside its window carries the keys of those findings, in every view.
 */
export interface FlaggedFigure extends MetricRow {
  /** Keys of the error-level findings inside the figure's window; empty when none. */
  readonly flagged_by: readonly string[];
}

const FLAGGING = severityRank('error');

export function flagFigures(figures: readonly MetricRow[], findings: readonly Finding[], metricsAsOf: string): FlaggedFigure[] {
  const serious = new Map<string, Finding[]>();
  for (const finding of findings) {
    if (finding.series_id === null || severityRank(finding.severity) < FLAGGING) continue;
    serious.set(finding.series_id, [...(serious.get(finding.series_id) ?? []), finding]);
  }
  const asOf = parseIsoDate(metricsAsOf) ?? 0;
  const startOf = new Map<string, string>();
  return figures.map((figure) => {
    const against = serious.get(figure.series_id);
    if (!against) return { ...figure, flagged_by: [] };
    let start = startOf.get(figure.window);
    if (start === undefined) {
      const months = parseWindow(figure.window) ?? 0;
      start = formatIsoDate(monthEndDay(monthIndex(asOf) - months));
      startOf.set(figure.window, start);
    }
    const inWindow = against.filter((f) => (f.end ?? metricsAsOf) >= start! && (f.start ?? start!) <= metricsAsOf);
    return { ...figure, flagged_by: inWindow.map((f) => f.key) };
  });
}
