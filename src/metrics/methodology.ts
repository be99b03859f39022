import { z } from 'zod';

/**
 * A methodology: every convention that makes two honest computations of the same figure differ.
 * Its dimensions are the ones reconciliation explains vendor figures with (interface.md), plus the
 * risk-free source. Other methodologies are configured, never coded per customer.
 */

export const FREQUENCIES = ['daily', 'weekly', 'monthly'] as const;
export type Frequency = (typeof FREQUENCIES)[number];

/** Periods a year each frequency annualises by when `annualization` is not set. */
export const DEFAULT_ANNUALIZATION: Readonly<Record<Frequency, number>> = { monthly: 12, weekly: 52, daily: 252 };

export const RiskFreeSchema = z.discriminatedUnion('source', [
  /** The master's `rate_id` series (or `rate_id` given here, for every series). */
  z.object({ source: z.literal('series'), rate_id: z.string().min(1).optional() }),
  /** One annual rate, a decimal (0.02 is 2 %), for every period. */
  z.object({ source: z.literal('constant'), annual_rate: z.number().finite() }),
  /** No risk-free rate: excess returns equal returns. */
  z.object({ source: z.literal('none') }),
]);
export type RiskFree = z.infer<typeof RiskFreeSchema>;

/** Names of the minimum acceptable returns that are not a fixed number. */
export const MAR_SOURCES = ['risk_free', 'zero'] as const;

/** Each dimension's values, without defaults (a changes object must not fill in the rest). */
const DIMENSIONS = {
  frequency: z.enum(FREQUENCIES),
  /** Periods a year; null means the frequency's default (12, 52 or 252). */
  annualization: z.number().positive().finite().nullable(),
  sd_denominator: z.enum(['sample', 'population']),
  return_type: z.enum(['simple', 'log']),
  regression: z.enum(['excess', 'raw']),
  alpha_form: z.enum(['jensen', 'jensen_geometric', 'excess_return', 'compounded']),
  /** The minimum acceptable return: the risk-free rate, zero, or a fixed annual rate (0.02 is 2 %). */
  mar: z.union([z.enum(MAR_SOURCES), z.number().finite().gt(-1)], { error: 'must be risk_free, zero or an annual rate such as 0.02' }),
  dd_denominator: z.enum(['full', 'below']),
  /** Months the window ends before the as-of month: 0 is the as-of month, −1 the month before. */
  window_end: z.number().int().max(0),
  /** A benchmark id used instead of the master's mapping; null keeps the master's. */
  benchmark: z.string().min(1).nullable(),
  risk_free: RiskFreeSchema,
  /** Periods a year an annual rate is spread over: the frequency's own, or the annualisation A. */
  rate_periods: z.enum(['frequency', 'annualization']),
  /** An annual rate c per period: c / P (simple) or (1 + c)^(1/P) − 1 (compound). */
  rate_conversion: z.enum(['simple', 'compound']),
  /** Max drawdown over every NAV observation of the window, or over its sample points only. */
  drawdown: z.enum(['every_nav', 'sampled']),
  /** Sharpe, Sortino, information ratio and Treynor annualised, or per period. */
  ratio_scale: z.enum(['annualized', 'per_period']),
  /** Annualised returns compound to a year by periods (A / n) or by calendar days (365.25 / days). */
  return_annualization: z.enum(['periods', 'calendar_days']),
};

/** Annualisation factors in common use (interface.md). */
export const COMMON_ANNUALIZATIONS: readonly number[] = [12, 52, 250, 252, 260, 365];

/**
 * Every methodology dimension a search may change, with the values it can try, in one list.
 * `resamples` says whether a change re-reads the window (a new pass over the data); every other
 * dimension is arithmetic on the cached window statistics, except `annualization` under
 * `rate_periods: annualization`, where A also sets the per-period rate. `benchmark`, `window_end` and
 * `risk_free` take values from the data or the run (benchmark ids, months, rate sources), and
 * `mar` may also be any fixed annual rate, so their lists hold only the named choices.
 */
export const METHODOLOGY_DIMENSIONS = [
  { name: 'frequency', values: DIMENSIONS.frequency.options, resamples: true },
  { name: 'annualization', values: COMMON_ANNUALIZATIONS, resamples: false },
  { name: 'sd_denominator', values: DIMENSIONS.sd_denominator.options, resamples: false },
  { name: 'return_type', values: DIMENSIONS.return_type.options, resamples: false },
  { name: 'regression', values: DIMENSIONS.regression.options, resamples: false },
  { name: 'alpha_form', values: DIMENSIONS.alpha_form.options, resamples: false },
  { name: 'mar', values: MAR_SOURCES, resamples: false },
  { name: 'dd_denominator', values: DIMENSIONS.dd_denominator.options, resamples: false },
  { name: 'rate_periods', values: DIMENSIONS.rate_periods.options, resamples: true },
  { name: 'rate_conversion', values: DIMENSIONS.rate_conversion.options, resamples: true },
  { name: 'drawdown', values: DIMENSIONS.drawdown.options, resamples: false },
  { name: 'ratio_scale', values: DIMENSIONS.ratio_scale.options, resamples: false },
  { name: 'return_annualization', values: DIMENSIONS.return_annualization.options, resamples: false },
  { name: 'window_end', values: [0, -1, -2], resamples: true },
  { name: 'benchmark', values: [], resamples: true },
  { name: 'risk_free', values: [], resamples: true },
] as const satisfies ReadonlyArray<{ name: keyof typeof DIMENSIONS; values: readonly unknown[]; resamples: boolean }>;

/** The values each dimension with a closed list of named values can take, for a methodology search to try. */
export const DIMENSION_CHOICES = {
  frequency: DIMENSIONS.frequency.options,
  sd_denominator: DIMENSIONS.sd_denominator.options,
  return_type: DIMENSIONS.return_type.options,
  regression: DIMENSIONS.regression.options,
  alpha_form: DIMENSIONS.alpha_form.options,
  mar: MAR_SOURCES,
  dd_denominator: DIMENSIONS.dd_denominator.options,
  rate_periods: DIMENSIONS.rate_periods.options,
  rate_conversion: DIMENSIONS.rate_conversion.options,
  drawdown: DIMENSIONS.drawdown.options,
  ratio_scale: DIMENSIONS.ratio_scale.options,
  return_annualization: DIMENSIONS.return_annualization.options,
} as const;

export const MethodologySchema = z.object({
  frequency: DIMENSIONS.frequency.default('monthly'),
  annualization: DIMENSIONS.annualization.default(null),
  sd_denominator: DIMENSIONS.sd_denominator.default('sample'),
  return_type: DIMENSIONS.return_type.default('simple'),
  regression: DIMENSIONS.regression.default('excess'),
  alpha_form: DIMENSIONS.alpha_form.default('jensen'),
  mar: DIMENSIONS.mar.default('risk_free'),
  dd_denominator: DIMENSIONS.dd_denominator.default('full'),
  window_end: DIMENSIONS.window_end.default(0),
  benchmark: DIMENSIONS.benchmark.default(null),
  risk_free: DIMENSIONS.risk_free.default({ source: 'series' }),
  rate_periods: DIMENSIONS.rate_periods.default('frequency'),
  rate_conversion: DIMENSIONS.rate_conversion.default('simple'),
  drawdown: DIMENSIONS.drawdown.default('every_nav'),
  ratio_scale: DIMENSIONS.ratio_scale.default('annualized'),
  return_annualization: DIMENSIONS.return_annualization.default('periods'),
});

export type Methodology = z.infer<typeof MethodologySchema>;
/** What a configuration file may write: any dimension may be left out. */
export type MethodologyInput = z.input<typeof MethodologySchema>;
export type MethodologyDimension = keyof Methodology;
/** A set of dimensions changed from a base methodology, as reconciliation reports it. */
export type MethodologyChanges = Partial<Methodology>;

/** interface.md's `monthly` methodology. */
export const DEFAULT_METHODOLOGY: Readonly<Methodology> = Object.freeze<Methodology>({
  frequency: 'monthly',
  annualization: null,
  sd_denominator: 'sample',
  return_type: 'simple',
  regression: 'excess',
  alpha_form: 'jensen',
  mar: 'risk_free',
  dd_denominator: 'full',
  window_end: 0,
  benchmark: null,
  risk_free: { source: 'series' },
  rate_periods: 'frequency',
  rate_conversion: 'simple',
  drawdown: 'every_nav',
  ratio_scale: 'annualized',
  return_annualization: 'periods',
});

export function parseMethodology(input: unknown): Methodology {
  return MethodologySchema.parse(input ?? {});
}

/** Checks a changes object (dimension → value) as a configuration or a search would write it. */
export const MethodologyChangesSchema = z.object(DIMENSIONS).partial().strict();

export function parseMethodologyChanges(input: unknown): MethodologyChanges {
  return MethodologyChangesSchema.parse(input);
}

/**
 * The base methodology with some dimensions changed. Typed and unchecked, so a methodology
 * search can call it thousands of times; use `parseMethodologyChanges` on untrusted input.
 */
export function withChanges(base: Methodology, changes: MethodologyChanges): Methodology {
  return { ...base, ...changes };
}

/** The periods a year the methodology annualises by. */
export function annualizationOf(methodology: Methodology): number {
  return methodology.annualization ?? DEFAULT_ANNUALIZATION[methodology.frequency];
}

/**
 * The periods a year an annual rate is spread over: the frequency's own (12 monthly, 52 weekly,
 * 252 daily) by default, so that changing A alone never changes the excess returns; A itself
 * with `rate_periods: annualization`.
 */
export function ratePeriodsOf(methodology: Methodology): number {
  return methodology.rate_periods === 'annualization' ? annualizationOf(methodology) : DEFAULT_ANNUALIZATION[methodology.frequency];
}

/** An annual rate as a per-period rate: c / P (`simple`) or (1 + c)^(1/P) − 1 (`compound`). */
export function perPeriodRate(annualRate: number, methodology: Methodology): number {
  const periods = ratePeriodsOf(methodology);
  return methodology.rate_conversion === 'compound' ? Math.expm1(Math.log1p(annualRate) / periods) : annualRate / periods;
}

/** The methodology as reports show it: the annualisation written out. */
export function describeMethodology(methodology: Methodology): Methodology {
  return { ...methodology, annualization: annualizationOf(methodology) };
}
