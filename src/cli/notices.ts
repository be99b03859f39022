import type { CheckSettings } from '../checks/settings.js';
import type { LoadedFeed } from '../ingest/feed.js';
import { DEFAULT_ANNUALIZATION, type Methodology } from '../metrics/methodology.js';

/**
 * Settings that are allowed but probably not meant: said on standard error, never refused.
 * Each function returns the sentences to print (none when all is well).
 */

/** A `checks.series` entry for a series that is in none of the day's files is likely a typo. */
export function unknownSeriesNotices(settings: CheckSettings, feed: LoadedFeed): string[] {
  const known = new Set([...feed.nav.ids, ...(feed.benchmarks?.ids ?? []), ...(feed.master ?? []).map((record) => record.series_id)]);
  return Object.keys(settings.series ?? {})
    .filter((id) => !known.has(id))
    .map((id) => `warning: checks.series names "${id}", which is in none of the day's files; its settings apply to nothing (check the id).`);
}

/**
 * An annualisation other than the frequency's own (252 with monthly returns) is a choice some
 * vendors make, so it is accepted, but the figures then differ from the usual ones.
 */
export function annualizationNotices(methodology: Methodology): string[] {
  const usual = DEFAULT_ANNUALIZATION[methodology.frequency];
  if (methodology.annualization === null || methodology.annualization === usual) return [];
  return [
    `note: annualization ${methodology.annualization} with ${methodology.frequency} returns (usually ${usual}); figures are annualised by ${methodology.annualization} as asked.`,
  ];
}

export function printNotices(notices: readonly string[]): void {
  for (const notice of notices) process.stderr.write(`navassay: ${notice}\n`);
}
