import type { Finding } from '../../findings.js';
import type { Methodology } from '../../metrics/methodology.js';
import { reconcile, type ReconcileAnswer } from '../../reconcile/reconcile.js';
import type { ToleranceSettings } from '../../reconcile/tolerances.js';
import type { Day } from '../day.js';

export interface ReconcileRequest {
  readonly methodology: Methodology;
  readonly tolerances?: ToleranceSettings;
  /** Reconcile only the vendor's figures of this epoch day; all of them when absent. */
  readonly asOf?: number;
  /** Reconcile only the vendor's figures dated on or before this epoch day. */
  readonly through?: number;
}

/**
 * The reconcile stage: every vendor figure of the day judged against navassay's, computed by
 * the day's one calculator (so figures the metrics stage computed are not computed again) and
 * explained with the check stage's findings. Null when the day has no vendor file, or no
 * benchmarks and master to compute figures from.
 */
export function reconcileStage(day: Day, findings: readonly Finding[], request: ReconcileRequest): ReconcileAnswer | null {
  if (!day.feed.vendor || !day.figures) return null;
  const { inputs, calculator } = day.figures;
  return reconcile({ vendor: day.feed.vendor, data: inputs, findings, calculator }, request);
}
