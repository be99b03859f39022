import { z } from 'zod';
import { METRIC_IDS, type MetricId } from '../ingest/schema.js';

/**
 * How far a vendor's figure may lie from navassay's and still match. A tolerance has an absolute
 * part and a relative part; a figure matches when |vendor − computed| ≤ max(absolute,
 * relative × |computed|). docs/reconciliation.md gives the reasons for the defaults.
 *
 * The run configuration overrides them like the checks' settings: `run` for every series, then
 * `categories` (the master's category, case-insensitive), then `series`:
 *
 * ```yaml
 * reconcile:
 *   tolerances:
 *     run:        { beta: { absolute: 0.002 } }
 *     categories: { Money Market: { std_dev: { absolute: 0.00002 } } }
 *     series:     { S0001: { sharpe: { relative: 0.01 } } }
 * ```
 */
export interface Tolerance {
  readonly absolute: number;
  readonly relative: number;
}

/** One basis point: the smallest move in an annualised return or risk a factsheet reader notices. */
const BASIS_POINT: Tolerance = { absolute: 0.0001, relative: 0 };
/** A thousandth: beta, R² and the ratios are printed to two decimals at most, often three. */
const THOUSANDTH: Tolerance = { absolute: 0.001, relative: 0 };

export const DEFAULT_TOLERANCES: Readonly<Record<MetricId, Tolerance>> = {
  return_annualized: BASIS_POINT,
  std_dev: BASIS_POINT,
  downside_deviation: BASIS_POINT,
  alpha: BASIS_POINT,
  tracking_error: BASIS_POINT,
  max_drawdown: BASIS_POINT,
  treynor: BASIS_POINT,
  beta: THOUSANDTH,
  r_squared: THOUSANDTH,
  sharpe: THOUSANDTH,
  sortino: THOUSANDTH,
  information_ratio: THOUSANDTH,
};

const ToleranceOverrideSchema = z.strictObject({
  absolute: z.number().finite().nonnegative().optional(),
  relative: z.number().finite().nonnegative().optional(),
});
const MetricOverridesSchema = z.strictObject(Object.fromEntries(METRIC_IDS.map((id) => [id, ToleranceOverrideSchema.optional()])));

export const ToleranceSettingsSchema = z.strictObject({
  run: MetricOverridesSchema.optional(),
  categories: z.record(z.string(), MetricOverridesSchema).optional(),
  series: z.record(z.string(), MetricOverridesSchema).optional(),
});

type ToleranceOverride = z.infer<typeof ToleranceOverrideSchema>;
type MetricOverrides = Partial<Record<string, ToleranceOverride>>;
export interface ToleranceSettings {
  run?: MetricOverrides;
  categories?: Record<string, MetricOverrides>;
  series?: Record<string, MetricOverrides>;
}

/** The tolerance of one metric for one series: defaults, then run, category and series overrides. */
export class ToleranceResolver {
  private readonly categories: Map<string, MetricOverrides>;
  /** Each category as the master writes it, with its overrides (normalising the name per figure cost more than the rest). */
  private readonly byWrittenCategory = new Map<string, MetricOverrides | undefined>();

  constructor(private readonly settings: ToleranceSettings = {}) {
    this.categories = new Map(Object.entries(settings.categories ?? {}).map(([name, overrides]) => [normalise(name), overrides]));
  }

  resolve(metric: MetricId, category: string | null | undefined, seriesId: string): Tolerance {
    let tolerance = DEFAULT_TOLERANCES[metric];
    tolerance = merge(tolerance, this.settings.run?.[metric]);
    if (category && this.categories.size > 0) tolerance = merge(tolerance, this.overridesOf(category)?.[metric]);
    return merge(tolerance, this.settings.series?.[seriesId]?.[metric]);
  }

  private overridesOf(category: string): MetricOverrides | undefined {
    if (!this.byWrittenCategory.has(category)) this.byWrittenCategory.set(category, this.categories.get(normalise(category)));
    return this.byWrittenCategory.get(category);
  }
}

/** The largest difference the tolerance allows around a computed value. */
export function allowedDifference(tolerance: Tolerance, computed: number): number {
  return Math.max(tolerance.absolute, tolerance.relative * Math.abs(computed));
}

function merge(base: Tolerance, override: ToleranceOverride | undefined): Tolerance {
  if (!override) return base;
  return { absolute: override.absolute ?? base.absolute, relative: override.relative ?? base.relative };
}

function normalise(category: string): string {
  return category.trim().toLowerCase();
}
