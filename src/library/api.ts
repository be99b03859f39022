import { runChecks } from '../checks/run.js';
import type { CheckSettings } from '../checks/settings.js';
import type { LoadedFeed } from '../ingest/feed.js';
import { computeMetrics, type MetricsAnswer } from '../metrics/compute.js';
import { parseMethodology, type MethodologyInput } from '../metrics/methodology.js';
import { checkAnswer, type CheckAnswer } from '../report/check-answer.js';
import { loadRunConfig } from '../config/run-config.js';
import { ConfigError } from '../ingest/errors.js';
import { runDailyJob, type DailyRun } from '../job/daily-job.js';
import { figureInputs } from '../job/day.js';
import type { DatedFrame } from '../series/frame.js';
import { epochDayOf, type DateInput } from './dates.js';

/**
 * The library's stable calls, in the words of the command line: check a loaded feed, compute
 * its risk figures. Dates are ISO strings or `Date`s; answers are the commands' JSON answers.
 */

export interface CheckFeedOptions {
  readonly asOf: DateInput;
  /** The previous snapshot's NAVs (see `loadPreviousNav`), for restated and dropped rows. */
  readonly previous?: DatedFrame;
  /** Check parameters per run, category and series, as the run configuration's `checks:`. */
  readonly settings?: CheckSettings;
}

/** What `navassay check --format json` answers for the same files. */
export function checkFeed(feed: LoadedFeed, options: CheckFeedOptions): CheckAnswer {
  const asOf = epochDayOf(options.asOf);
  return checkAnswer(asOf, feed.rows, runChecks({ ...feed, previous: options.previous, asOf }, options.settings));
}

export interface ComputeFiguresOptions {
  readonly asOf: DateInput;
  /** Window labels such as `1y`, `3y`, `6m`; default 1y, 3y, 5y. */
  readonly windows?: readonly string[];
  /** Any methodology dimensions to change from the default `monthly` (docs/methodology.md). */
  readonly methodology?: MethodologyInput;
  /** A constant annual risk-free rate as a decimal, as `--rf`. */
  readonly constantRate?: number;
}

/**
 * What `navassay metrics --format json` answers: figures on NAVs adjusted for the feed's
 * corporate actions. The feed must hold a benchmarks file and a master.
 */
export function computeFigures(feed: LoadedFeed, options: ComputeFiguresOptions): MetricsAnswer {
  const inputs = figureInputs(feed, options.constantRate);
  if (!inputs) throw new TypeError('computeFigures needs a feed loaded with benchmarks and master files.');
  return computeMetrics({
    ...inputs,
    asOf: epochDayOf(options.asOf),
    windows: options.windows ?? ['1y', '3y', '5y'],
    methodology: parseMethodology(options.methodology),
  });
}

export interface RunDayOptions {
  /** The as-of date; default the configuration's `as_of`. */
  readonly asOf?: DateInput;
}

/**
 * The whole daily job from a run configuration, as `navassay run` does it: load, checks, risk
 * figures, reconciliation (with a vendor file), tickets, the snapshot stored and the day's
 * report written. Returns each stage's output.
 */
export async function runDay(configPath: string, options: RunDayOptions = {}): Promise<DailyRun> {
  const config = loadRunConfig(configPath);
  const asOf = options.asOf ?? config.as_of;
  if (asOf === undefined) throw new ConfigError(`${configPath} has no as_of; pass asOf as a YYYY-MM-DD string or a Date.`);
  return runDailyJob(config, epochDayOf(asOf));
}
