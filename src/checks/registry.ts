/** Every check navassay knows, in catalogue order. Adding a check is adding a file to `checks/` and a line here. */
import type { Check } from './check.js';
import { benchmarkMismatch } from '../../checks/benchmark-mismatch.js';
import { dateShift } from '../../checks/date-shift.js';
import { droppedRows } from '../../checks/dropped-rows.js';
import { duplicateConflict } from '../../checks/duplicate-conflict.js';
import { duplicateRow } from '../../checks/duplicate-row.js';
import { futureDate } from '../../checks/future-date.js';
import { invalidIdentifier } from '../../checks/invalid-identifier.js';
import { lateSeries } from '../../checks/late-series.js';
import { missingDates } from '../../checks/missing-dates.js';
import { nonPositiveValue } from '../../checks/non-positive-value.js';
import { offCalendarDate } from '../../checks/off-calendar-date.js';
import { restatedValue } from '../../checks/restated-value.js';
import { returnOutlier } from '../../checks/return-outlier.js';
import { spikeReversal } from '../../checks/spike-reversal.js';
import { splitLikeJump } from '../../checks/split-like-jump.js';
import { staleValue } from '../../checks/stale-value.js';
import { unknownSeries } from '../../checks/unknown-series.js';
import { unparseableRow } from '../../checks/unparseable-row.js';
import { vendorInconsistent } from '../../checks/vendor-inconsistent.js';

export const CHECKS: readonly Check[] = [
  missingDates,
  lateSeries,
  staleValue,
  splitLikeJump,
  spikeReversal,
  returnOutlier,
  dateShift,
  offCalendarDate,
  futureDate,
  duplicateRow,
  duplicateConflict,
  nonPositiveValue,
  unparseableRow,
  unknownSeries,
  restatedValue,
  droppedRows,
  benchmarkMismatch,
  invalidIdentifier,
  vendorInconsistent,
];

export const CHECK_IDS: readonly string[] = CHECKS.map((check) => check.id);

export function checkById(id: string): Check | undefined {
  return CHECKS.find((check) => check.id === id);
}
