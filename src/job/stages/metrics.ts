import type { Finding } from '../../findings.js';
import { computeMetrics, type MetricsAnswer } from '../../metrics/compute.js';
import type { Methodology } from '../../metrics/methodology.js';
import { markSuspectFigures } from '../../reconcile/suspect-data.js';
import type { Day } from '../day.js';

export interface FigureRequest {
  /** Epoch day the figures are computed as of (the daily job uses the last month-end). */
  readonly asOf: number;
  readonly windows: readonly string[];
  readonly methodology: Methodology;
}

/**
 * The metrics stage: every figure on the day's adjusted NAVs; null when the day has no
 * benchmarks or master. Given the check stage's findings, a figure whose window holds an
 * error-level finding carries their keys as `suspect_data`.
 */
export function metricsStage(day: Day, request: FigureRequest, findings: readonly Finding[] = []): MetricsAnswer | null {
  return markFigures(day, computeFigures(day, request), findings);
}

/**
 * The metrics stage's first half, which needs no finding: the figures themselves. The daily
 * job computes them while the check workers run.
 */
export function computeFigures(day: Day, request: FigureRequest): MetricsAnswer | null {
  if (!day.figures) return null;
  return computeMetrics({ ...day.figures.inputs, ...request }, day.figures.calculator);
}

/** The metrics stage's second half: the figures whose window holds an error-level finding marked. */
export function markFigures(day: Day, figures: MetricsAnswer | null, findings: readonly Finding[]): MetricsAnswer | null {
  if (!figures || !day.figures) return figures;
  return markSuspectFigures(figures, findings, day.figures.inputs.master);
}
