import { runChecksInParallel, type ParallelOptions } from '../../checks/parallel.js';
import type { CheckSettings } from '../../checks/settings.js';
import { checkAnswer, type CheckAnswer } from '../../report/check-answer.js';
import type { Day } from '../day.js';

/**
 * The checks stage: the whole catalogue over the day's raw (unadjusted) NAVs, the series-level
 * checks on worker threads and this one for a large feed (src/checks/parallel.ts; same findings as one thread).
 */
export async function checkStage(day: Day, settings: CheckSettings = {}, parallel: ParallelOptions = {}): Promise<CheckAnswer> {
  const findings = await runChecksInParallel({ ...day.feed, previous: day.previous, asOf: day.asOf }, settings, parallel);
  const answer = checkAnswer(day.asOf, day.feed.rows, findings);
  return day.skippedSnapshots.length > 0 ? { ...answer, skipped_snapshots: day.skippedSnapshots } : answer;
}
