import { runChecks } from '../checks/run.js';
import type { CheckSettings } from '../checks/settings.js';
import type { LoadedFeed } from '../ingest/feed.js';
import { computeMetrics, type MetricsAnswer } from '../metrics/compute.js';
import { parseMethodology, type MethodologyInput } from '../metrics/methodology.js';
import { checkAnswer, type CheckAnswer } from '../report/check-answer.js';
import { adjustForCorporateActions } from '../series/adjust.js';
import type { SeriesFrame } from '../series/frame.js';
import { epochDayOf, type DateInput } from './dates.js';

/**
 * The library's stable calls, in the words of the command line: check a loaded feed, compute
 * its risk figures. Dates are ISO strings or `Date`s; answers are the commands' JSON answers.
 */

export interface CheckFeedOptions {
  readonly asOf: DateInput;
  /** The previous snapshot's NAVs (see `loadPreviousNav`), for restated and dropped rows. */
  readonly previous?: SeriesFrame;
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
  if (!feed.benchmarks || !feed.master) throw new TypeError('computeFigures needs a feed loaded with benchmarks and master files.');
  return computeMetrics({
    nav: adjustForCorporateActions(feed.nav, feed.actions ?? []),
    benchmarks: feed.benchmarks,
    master: feed.master,
    rates: feed.rates,
    constantRate: options.constantRate,
    asOf: epochDayOf(options.asOf),
    windows: options.windows ?? ['1y', '3y', '5y'],
    methodology: parseMethodology(options.methodology),
  });
}
