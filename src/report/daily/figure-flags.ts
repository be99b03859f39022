import type { Finding } from '../../findings.js';
import type { MetricRow, MetricsAnswer } from '../../metrics/compute.js';
import { markSuspectFigures } from '../../reconcile/suspect-data.js';

/**
 * A figure a person can trust at a glance: one computed on a series with an error-level (or
 * worse) finding inside its window carries the keys of those findings, in every view. The rule
 * is the one of `suspect_data` (src/reconcile/suspect-data.ts): figures the metrics stage marked
 * keep their keys (a benchmark figure's include its benchmark's findings), and unmarked ones are
 * marked here against the findings given.
 */
export interface FlaggedFigure extends MetricRow {
  /** Keys of the error-level findings inside the figure's window; empty when none. */
  readonly flagged_by: readonly string[];
}

/**
 * The metrics' figures and, index for index, their flags: what `flagFigures` gives without an
 * object per figure. At 10,000 series there are 360,000 figures, and only figures.csv reads them
 * all; the day's report shows at most a few hundred.
 */
export interface FigureFlags {
  readonly figures: readonly MetricRow[];
  /** The `flagged_by` of each figure. */
  readonly flags: ReadonlyArray<readonly string[]>;
}

export function figureFlags(metrics: MetricsAnswer, findings: readonly Finding[]): FigureFlags {
  const marked = markSuspectFigures(metrics, findings, []).metrics;
  const flags = metrics.metrics.map((figure, index) => {
    const own = figure.suspect_data;
    const more = marked[index].suspect_data;
    // Most figures have no flag: no sets built for them, and one shared empty list.
    return own === undefined && more === undefined ? NO_FLAGS : [...new Set([...(own ?? []), ...(more ?? [])])];
  });
  return { figures: metrics.metrics, flags };
}

/**
 * `figureFlags` of figures the metrics stage has marked (`markSuspectFigures` with the series
 * master) against the same findings, without marking the 360,000 figures again: marking them here
 * looks at the same findings on the series alone (or the methodology's benchmark, as the metrics
 * stage did), so it can only find keys the figure carries already, and the flags are its own keys
 * once each.
 */
export function flagsOfMarkedFigures(metrics: MetricsAnswer): FigureFlags {
  const flags = metrics.metrics.map((figure) => {
    const own = figure.suspect_data;
    return own === undefined ? NO_FLAGS : [...new Set(own)];
  });
  return { figures: metrics.metrics, flags };
}

const NO_FLAGS: readonly string[] = Object.freeze([]);

/** Figure `index` with its flags: the figure's keys in their order, then `flagged_by`. */
export function flaggedFigure(flagged: FigureFlags, index: number): FlaggedFigure {
  return { ...flagged.figures[index], flagged_by: flagged.flags[index] };
}

/** Every figure with its flags. */
export function flagFigures(metrics: MetricsAnswer, findings: readonly Finding[]): FlaggedFigure[] {
  const flagged = figureFlags(metrics, findings);
  return flagged.figures.map((_, index) => flaggedFigure(flagged, index));
}
