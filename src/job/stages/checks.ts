import { runChecks } from '../../checks/run.js';
import type { CheckSettings } from '../../checks/settings.js';
import { checkAnswer, type CheckAnswer } from '../../report/check-answer.js';
import type { Day } from '../day.js';

/** The checks stage: the whole catalogue over the day's raw (unadjusted) NAVs. */
export function checkStage(day: Day, settings: CheckSettings = {}): CheckAnswer {
  const findings = runChecks({ ...day.feed, previous: day.previous, asOf: day.asOf }, settings);
  const answer = checkAnswer(day.asOf, day.feed.rows, findings);
  return day.skippedSnapshots.length > 0 ? { ...answer, skipped_snapshots: day.skippedSnapshots } : answer;
}
