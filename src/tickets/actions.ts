/**
 * What a person should do about each kind of problem, and how a ticket names it. One table,
 * so every ticket of a check reads the same way; a check not listed falls back to its id.
 */
export interface TicketWording {
  readonly title: string;
  readonly action: string;
}

export const TICKET_WORDING: Readonly<Record<string, TicketWording>> = {
  missing_dates: { title: 'business days missing', action: 'Ask the provider for the missing days, or add the holidays to the calendar if the market was closed.' },
  late_series: { title: 'no recent NAV', action: 'Ask the provider why the series stopped; mark it closed in the master if it was.' },
  stale_value: { title: 'NAV repeated over several days', action: 'Confirm with the provider whether the fund was priced; ask for the real NAVs.' },
  split_like_jump: { title: 'jump that looks like a split or a unit change', action: 'Check for an unannounced split or a change of quoting unit; add the corporate action or ask for a corrected history.' },
  spike_reversal: { title: 'one-day spike that reverses', action: 'Ask the provider to correct the keyed value.' },
  return_outlier: { title: 'move its benchmark does not explain', action: 'Check the price against a second source.' },
  date_shift: { title: 'NAVs stamped on the wrong dates', action: 'Ask the provider which valuation date the file carries and realign the history.' },
  off_calendar_date: { title: 'NAV dated on a non-business day', action: 'Check the calendar in the master and the date stamping of the file.' },
  future_date: { title: 'rows dated after the as-of date', action: 'Ask the provider to remove or redate the rows.' },
  duplicate_conflict: { title: 'two different NAVs for one date', action: 'Ask the provider which value is right; have the wrong row withdrawn.' },
  duplicate_row: { title: 'the same row sent twice', action: 'Harmless for the figures; ask the provider to deduplicate the file.' },
  non_positive_value: { title: 'zero or negative NAV', action: 'Ask the provider for the real value.' },
  unparseable_row: { title: 'rows that could not be read', action: 'Open quarantine.csv, fix the rows at the source and resend.' },
  unknown_series: { title: 'series the master does not know', action: 'Add the series to the master, or ask the provider why it is sent.' },
  restated_value: { title: 'history changed since the last run', action: 'Confirm the restatement with the provider; recompute figures that used the old values.' },
  dropped_rows: { title: 'rows present last run are gone', action: 'Ask the provider whether the rows were withdrawn on purpose.' },
  benchmark_mismatch: { title: 'moves with another benchmark than the one mapped', action: 'Check the benchmark mapping in the master.' },
  vendor_inconsistent: { title: "vendor's figures contradict themselves", action: 'Ask the vendor to correct the published figures.' },
  calendar_gap: { title: 'dates missing from a whole calendar', action: 'Add the holidays to the calendar, or ask the provider for the days.' },
  shared_stale_day: { title: 'many series stale from the same day', action: 'Ask the provider whether a price source stopped.' },
  feed_date_shift: { title: 'whole feed stamped on shifted dates', action: 'Ask the provider which valuation date the file carries.' },
  reconcile_breach: { title: "vendor's figures outside tolerance", action: "Compare the methodology with the vendor's; if no convention explains it, ask the vendor." },
  vendor_explanation: { title: "a convention explains the vendor's figures", action: 'Record the convention for the vendor, or ask it to publish under the agreed methodology.' },
};

export function wordingOf(check: string): TicketWording {
  return TICKET_WORDING[check] ?? { title: check.replace(/_/g, ' '), action: 'Read the evidence and decide with the provider.' };
}
