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

/** Each dimension's values, without defaults (a changes object must not fill in the rest). */
const DIMENSIONS = {
  frequency: z.enum(FREQUENCIES),
  /** Periods a year; null means the frequency's default (12, 52 or 252). */
  annualization: z.number().positive().finite().nullable(),
  sd_denominator: z.enum(['sample', 'population']),
  return_type: z.enum(['simple', 'log']),
  regression: z.enum(['excess', 'raw']),
  alpha_form: z.enum(['jensen', 'jensen_geometric', 'excess_return']),
  mar: z.enum(['risk_free', 'zero']),
  dd_denominator: z.enum(['full', 'below']),
  /** Months the window ends before the as-of month: 0 is the as-of month, −1 the month before. */
  window_end: z.number().int().max(0),
  /** A benchmark id used instead of the master's mapping; null keeps the master's. */
  benchmark: z.string().min(1).nullable(),
  risk_free: RiskFreeSchema,
};

/** The values each two-or-three-valued dimension can take, for a methodology search to try. */
export const DIMENSION_CHOICES = {
  frequency: DIMENSIONS.frequency.options,
  sd_denominator: DIMENSIONS.sd_denominator.options,
  return_type: DIMENSIONS.return_type.options,
  regression: DIMENSIONS.regression.options,
  alpha_form: DIMENSIONS.alpha_form.options,
  mar: DIMENSIONS.mar.options,
  dd_denominator: DIMENSIONS.dd_denominator.options,
} as const;

/** Annualisation factors in common use (interface.md). */
export const COMMON_ANNUALIZATIONS: readonly number[] = [12, 52, 250, 252, 260, 365];

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

/** The methodology as reports show it: the annualisation written out. */
export function describeMethodology(methodology: Methodology): Methodology {
  return { ...methodology, annualization: annualizationOf(methodology) };
}
