import { formatIsoDate } from '../calendar/days.js';
import type { Finding, Severity } from '../findings.js';
import type { SeriesMasterRecord, VendorFigureRecord } from '../ingest/records.js';
import { MetricCalculator, type MetricInputs } from '../metrics/compute.js';
import { metricIdOf, type MetricId } from '../metrics/kernels.js';
import { describeMethodology, type Methodology } from '../metrics/methodology.js';
import { parseWindow } from '../metrics/windows.js';
import { DataExplainer, type DataExplanation } from './data-explanations.js';
import { halfUnitOfPrinted } from './precision.js';
import { searchConventions, tellsConventionsApart, type ConventionExplanation } from './search.js';
import { judge, reproduces, severityOf, STATUSES, type ReconcileStatus } from './status.js';
import { SuspectData, windowDaySpan, type DaySpan } from './suspect-data.js';
import { allowedDifference, ToleranceResolver, type Tolerance, type ToleranceSettings } from './tolerances.js';
import { sharedCauseFirst, vendorPatterns, type VendorPattern } from './vendor-patterns.js';

/**
 * Reconciliation as a stage of the day: every vendor figure judged against navassay's, with the
 * reason when they differ. A pure function of already-loaded inputs; the `reconcile` command and
 * the daily run only load files and render the answer.
 */
export interface ReconcileInputs {
  readonly vendor: readonly VendorFigureRecord[];
  /** The data figures are computed from (NAVs already adjusted for announced corporate actions). */
  readonly data: MetricInputs;
  /** The checks' findings on the same data, for the data explanations. */
  readonly findings: readonly Finding[];
  /** A calculator over `data` to reuse (the day's metrics stage may already hold one). */
  readonly calculator?: MetricCalculator;
}

export interface ReconcileSettings {
  readonly methodology: Methodology;
  readonly tolerances?: ToleranceSettings;
  /** Reconcile only the vendor's figures of this day (epoch day); all of them when absent. */
  readonly asOf?: number;
  /** Reconcile only the vendor's figures dated on or before this day (epoch day): a daily run leaves out later ones. */
  readonly through?: number;
}

export type Explanation = ConventionExplanation | DataExplanation;

/** One line of `reconcile --format json` (interface.md), with additive evidence fields. */
export interface ReconcileResult {
  readonly series_id: string;
  readonly as_of: string;
  readonly window: string;
  readonly metric: string;
  /** The vendor's figure as read: a decimal, its unit applied. */
  readonly vendor: number;
  readonly computed: number | null;
  /** vendor − computed. */
  readonly difference: number | null;
  /** The largest difference the figure's tolerance allows. */
  readonly tolerance: number;
  readonly status: ReconcileStatus;
  readonly explanations: readonly Explanation[];
  readonly severity: Severity;
  /** The vendor's text and unit, its line, and half a unit of its printed precision (decimal). */
  readonly as_written: string;
  readonly unit: 'decimal' | 'percent';
  readonly line: number;
  readonly printed_half_unit: number;
  /** Why the figure is not computable. */
  readonly reason?: string;
  /** For `not_computable`: true when the data cannot support the figure, yet the vendor published it. */
  readonly unsupported_by_data?: boolean;
  /** Keys of the error-level findings in the figure's window. */
  readonly suspect_data?: readonly string[];
  /** Why a breach has no convention search, when it has none. */
  readonly note?: string;
}

export interface ReconcileSummary {
  readonly figures: number;
  readonly by_status: Record<ReconcileStatus, number>;
  readonly breaches: { readonly explained: number; readonly explained_by_data: number; readonly on_suspect_data: number; readonly unexplained: number };
  /** Figures the vendor published that this data cannot support. */
  readonly unsupported_by_data: number;
  readonly vendor_patterns: readonly VendorPattern[];
  /** Vendor figures of other days, left out by the as-of (or, in a daily run, dated after it). */
  readonly skipped: number;
}

export interface ReconcileAnswer {
  readonly as_of: string | null;
  readonly methodology: Methodology;
  readonly results: ReconcileResult[];
  readonly summary: ReconcileSummary;
}

export function reconcile(inputs: ReconcileInputs, settings: ReconcileSettings): ReconcileAnswer {
  const calculator = inputs.calculator ?? new MetricCalculator(inputs.data);
  const methodology = calculator.effectiveMethodology(settings.methodology);
  const context: FigureContext = {
    calculator,
    methodology,
    tolerances: new ToleranceResolver(settings.tolerances),
    suspects: new SuspectData(inputs.findings),
    data: new DataExplainer(inputs.data),
    master: new Map(inputs.data.master.map((record) => [record.series_id, record])),
    benchmarks: benchmarkIds(inputs.data),
    spanOf: memoized((asOf: number, window: string) => windowDaySpan(asOf, window, methodology.window_end)),
    isoDateOf: latestOf(formatIsoDate),
    isWindow: rememberedOf((label: string) => parseWindow(label) !== null),
  };
  const figures = inputs.vendor.filter(
    (figure) => (settings.asOf === undefined || figure.as_of === settings.asOf) && (settings.through === undefined || figure.as_of <= settings.through),
  );
  const results = withSharedCausesFirst(figures.map((figure) => reconcileFigure(figure, context)));
  return {
    as_of: settings.asOf === undefined ? null : formatIsoDate(settings.asOf),
    methodology: describeMethodology(methodology),
    results,
    summary: summarize(results, inputs.vendor.length - figures.length),
  };
}

/** Reorders each breach's explanations so the vendor's shared cause for its metric comes first. */
function withSharedCausesFirst(results: ReconcileResult[]): ReconcileResult[] {
  const patterns = vendorPatterns(results.filter((result) => result.status === 'breach'));
  if (patterns.length === 0) return results;
  return results.map((result) =>
    result.status === 'breach' ? { ...result, explanations: sharedCauseFirst(result.metric, result.explanations, patterns) } : result,
  );
}

interface FigureContext {
  readonly calculator: MetricCalculator;
  readonly methodology: Methodology;
  readonly tolerances: ToleranceResolver;
  readonly suspects: SuspectData;
  readonly data: DataExplainer;
  readonly master: ReadonlyMap<string, SeriesMasterRecord>;
  readonly benchmarks: readonly string[];
  /** The days a window's data comes from, for the suspect-data look-up (few distinct as-ofs and windows). */
  readonly spanOf: (asOf: number, window: string) => DaySpan | null;
  /** The as-of day written out (a day's vendor figures share one as-of). */
  readonly isoDateOf: (day: number) => string;
  /** Whether a label is a window (a vendor file holds few labels, each read by a regular expression). */
  readonly isWindow: (label: string) => boolean;
}

/** A function of one text that remembers each answer. */
function rememberedOf<T>(compute: (text: string) => T): (text: string) => T {
  const answers = new Map<string, T>();
  return (text) => {
    let answer = answers.get(text);
    if (answer === undefined && !answers.has(text)) answers.set(text, (answer = compute(text)));
    return answer as T;
  };
}

/** A function of one number that remembers its latest answer. */
function latestOf<T>(compute: (value: number) => T): (value: number) => T {
  let last: { value: number; answer: T } | null = null;
  return (value) => {
    if (last === null || last.value !== value) last = { value, answer: compute(value) };
    return last.answer;
  };
}

/** Keyed by window, then as-of: a look-up per figure builds no key string. */
function memoized<T>(compute: (asOf: number, window: string) => T): (asOf: number, window: string) => T {
  const memo = new Map<string, Map<number, T>>();
  return (asOf, window) => {
    let byAsOf = memo.get(window);
    if (!byAsOf) memo.set(window, (byAsOf = new Map()));
    if (!byAsOf.has(asOf)) byAsOf.set(asOf, compute(asOf, window));
    return byAsOf.get(asOf)!;
  };
}

function reconcileFigure(figure: VendorFigureRecord, context: FigureContext): ReconcileResult {
  const printed_half_unit = halfUnitOfPrinted(figure);
  const base = {
    series_id: figure.series_id,
    as_of: context.isoDateOf(figure.as_of),
    window: figure.window,
    metric: figure.metric,
    vendor: figure.value,
  };
  const evidence = { as_written: figure.raw_value, unit: figure.unit, line: figure.line, printed_half_unit };
  const metric = metricIdOf(figure.metric);
  if (metric === null || !context.isWindow(figure.window)) {
    const reason = metric !== null ? `unknown window "${figure.window}"` : `unknown metric "${figure.metric}"`;
    return notComputable(base, evidence, 0, reason, false);
  }
  const tolerance = context.tolerances.resolve(metric, context.master.get(figure.series_id)?.category, figure.series_id);
  const request = { seriesId: figure.series_id, asOf: figure.as_of, window: figure.window, metric, methodology: context.methodology };
  const outcome = context.calculator.metric(request);
  const benchmark = context.calculator.benchmarkId(figure.series_id, context.methodology);
  const suspects = context.suspects.forFigure(figure.series_id, benchmark, metric, context.spanOf(figure.as_of, figure.window));
  if (outcome.value === null) {
    const result = notComputable(base, evidence, tolerance.absolute, outcome.reason!, isAboutData(outcome.reason!));
    return suspects.length === 0 ? result : { ...result, suspect_data: suspects.map((finding) => finding.key) };
  }
  const computed = outcome.value;
  const allowed = allowedDifference(tolerance, computed);
  const { status, difference } = judge(figure.value, computed, allowed, printed_half_unit);
  const explanations =
    status === 'breach' ? explainBreach(figure, metric, computed, tolerance, printed_half_unit, benchmark, suspects, context) : NO_EXPLANATIONS;
  // Written out rather than spread together: spreading five objects into one cost more than the
  // rest of a matching figure's work at 180,000 figures. The key order is the answer's.
  const result: Mutable<ReconcileResult> = {
    series_id: base.series_id,
    as_of: base.as_of,
    window: base.window,
    metric: base.metric,
    vendor: base.vendor,
    computed,
    difference,
    tolerance: allowed,
    status,
    explanations,
    severity: severityOf(status, false),
    as_written: evidence.as_written,
    unit: evidence.unit,
    line: evidence.line,
    printed_half_unit,
  };
  if (suspects.length > 0) result.suspect_data = suspects.map((finding) => finding.key);
  if (status === 'breach' && !tellsConventionsApart(figure.value, printed_half_unit)) result.note = TOO_FEW_DIGITS;
  return result;
}

type Mutable<T> = { -readonly [K in keyof T]: T[K] };

/** The explanations of every figure that needs none, one list for them all: a matching figure is most of a day's. */
const NO_EXPLANATIONS: readonly Explanation[] = Object.freeze([]);

const TOO_FEW_DIGITS = 'the vendor printed fewer than two significant digits, too few to tell conventions apart; no convention was searched';

function explainBreach(
  figure: VendorFigureRecord,
  metric: MetricId,
  computed: number,
  tolerance: Tolerance,
  halfUnit: number,
  benchmark: string | null,
  suspects: readonly Finding[],
  context: FigureContext,
): Explanation[] {
  const conventions = searchConventions(context.calculator, {
    seriesId: figure.series_id,
    asOf: figure.as_of,
    window: figure.window,
    metric,
    methodology: context.methodology,
    unit: figure.unit,
    benchmark,
    benchmarks: context.benchmarks,
    vendor: figure.value,
    computed,
    allowed: (value) => allowedDifference(tolerance, value),
    halfUnit,
  });
  const data = context.data.explain(
    {
      seriesId: figure.series_id,
      asOf: figure.as_of,
      window: figure.window,
      metric,
      methodology: context.methodology,
      reproduces: (value) => reproduces(figure.value, value, allowedDifference(tolerance, value), halfUnit),
    },
    suspects,
  );
  return orderExplanations(conventions, data);
}

/** Single changes, then repairs that reproduce the figure, then pairs, then the findings whose repair does not. */
function orderExplanations(conventions: readonly ConventionExplanation[], data: readonly DataExplanation[]): Explanation[] {
  const singles = conventions.filter((c) => Object.keys(c.changes).length === 1);
  const pairs = conventions.filter((c) => Object.keys(c.changes).length > 1);
  return [...singles, ...data.filter((d) => d.reproduces), ...pairs, ...data.filter((d) => !d.reproduces)];
}

function notComputable(
  base: Pick<ReconcileResult, 'series_id' | 'as_of' | 'window' | 'metric' | 'vendor'>,
  evidence: Pick<ReconcileResult, 'as_written' | 'unit' | 'line' | 'printed_half_unit'>,
  tolerance: number,
  reason: string,
  unsupportedByData: boolean,
): ReconcileResult {
  return {
    ...base,
    computed: null,
    difference: null,
    tolerance,
    status: 'not_computable',
    explanations: [],
    severity: severityOf('not_computable', unsupportedByData),
    ...evidence,
    reason,
    unsupported_by_data: unsupportedByData,
  };
}

/**
 * A reason that lies in the data (history too short, months missing, no benchmark levels …)
 * rather than in what navassay was given to run with (no rate file, no constant rate, a label it
 * does not know): then the vendor published a figure this data cannot support.
 */
const NOT_ABOUT_DATA = [/no risk-free rates were given/, /no constant rate was given/, /^unknown (window|metric)/];

function isAboutData(reason: string): boolean {
  return !NOT_ABOUT_DATA.some((pattern) => pattern.test(reason));
}

function benchmarkIds(data: MetricInputs): string[] {
  const ids = new Set<string>(data.benchmarks.ids);
  for (const record of data.master) if (record.benchmark_id) ids.add(record.benchmark_id);
  return [...ids].sort();
}

function summarize(results: readonly ReconcileResult[], skipped: number): ReconcileSummary {
  const by_status = Object.fromEntries(STATUSES.map((status) => [status, 0])) as Record<ReconcileStatus, number>;
  for (const result of results) by_status[result.status]++;
  const breaches = results.filter((result) => result.status === 'breach');
  const explainedByConvention = (r: ReconcileResult) => r.explanations.some((e) => e.kind === 'convention');
  const explainedByData = (r: ReconcileResult) => r.explanations.some((e) => e.kind === 'data' && e.reproduces);
  const explained = new Set(breaches.filter((r) => explainedByConvention(r) || explainedByData(r)));
  const onSuspectData = breaches.filter((r) => !explained.has(r) && r.suspect_data !== undefined);
  return {
    figures: results.length,
    by_status,
    breaches: {
      explained: explained.size,
      explained_by_data: breaches.filter(explainedByData).length,
      on_suspect_data: onSuspectData.length,
      unexplained: breaches.length - explained.size - onSuspectData.length,
    },
    unsupported_by_data: results.filter((r) => r.unsupported_by_data === true).length,
    vendor_patterns: vendorPatterns(breaches),
    skipped,
  };
}
