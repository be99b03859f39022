import { computeMetrics, type MetricsAnswer } from '../../metrics/compute.js';
import type { Methodology } from '../../metrics/methodology.js';
import type { Day } from '../day.js';

export interface FigureRequest {
  /** Epoch day the figures are computed as of (the daily job uses the last month-end). */
  readonly asOf: number;
  readonly windows: readonly string[];
  readonly methodology: Methodology;
}

/** The metrics stage: every figure on the day's adjusted NAVs; null when the day has no benchmarks or master. */
export function metricsStage(day: Day, request: FigureRequest): MetricsAnswer | null {
  if (!day.figures) return null;
  return computeMetrics({ ...day.figures.inputs, ...request }, day.figures.calculator);
}
