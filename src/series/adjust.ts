import { firstAtOrAbove } from '../numeric/search.js';
import type { CorporateActionRecord } from '../ingest/records.js';
import type { SeriesFrame } from './frame.js';

/**
 * Back-adjusts NAVs for announced corporate actions so that returns are total returns on one
 * unit held throughout (common practice for performance series):
 *
 * - a split of k new units per old unit divides every NAV before the ex-date by k;
 * - a distribution D per unit, reinvested at the ex-date NAV P, divides every NAV before the
 *   ex-date by (P + D) / P, so the ex-date return is (P + D) / P_before − 1.
 *
 * NAVs on and after the ex-date are left as published. Returns a new frame sharing ids, dates
 * and lines with the input; only the values are copied.
 */
export function adjustForCorporateActions(frame: SeriesFrame, actions: readonly CorporateActionRecord[]): SeriesFrame {
  if (actions.length === 0) return frame;
  const values = frame.values.slice();
  for (const action of actions) {
    const index = frame.indexById.get(action.series_id);
    if (index === undefined) continue;
    const start = frame.offsets[index];
    const end = frame.offsets[index + 1];
    const exRow = firstAtOrAbove(frame.dates, action.ex_date, start, end);
    if (exRow === start || exRow === end) continue; // nothing before the ex-date, or no ex-date NAV
    const factor = adjustmentFactor(action, values[exRow]);
    if (!(factor > 0) || !Number.isFinite(factor)) continue;
    for (let row = start; row < exRow; row++) values[row] /= factor;
  }
  return { ...frame, values };
}

function adjustmentFactor(action: CorporateActionRecord, exDateNav: number): number {
  return action.kind === 'split' ? action.value : (exDateNav + action.value) / exDateNav;
}
