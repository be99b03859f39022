import { formatIsoDate } from '../calendar/days.js';
import type { SeriesMasterRecord } from '../ingest/records.js';
import { findSeries, type SeriesFrame, type SeriesSlice } from '../series/frame.js';
import { figureOrReason, METRIC_IDS, type MetricId } from './kernels.js';
import { describeMethodology, perPeriodRate, ratePeriodsOf, type Methodology } from './methodology.js';
import { failure, success, type Outcome } from '../outcome.js';
import { laterMonthlyStart, sampleWindow, type BenchmarkSource, type FundSample, type Observations, type RiskFreeSource, type SampleParts, type WindowRequest, type WindowSample } from './sampling.js';
import { log1pAll, sum, sumOfLog1p, windowStatistics, type WindowStatistics } from './statistics.js';
import { parseWindow, windowMonths, type WindowMonths } from './windows.js';

/** The data metrics are computed from. */
export interface MetricInputs {
  readonly nav: SeriesFrame;
  readonly benchmarks: SeriesFrame;
  readonly master: readonly SeriesMasterRecord[];
  readonly rates?: SeriesFrame;
  /** An annual risk-free rate given on the command line; it overrides the methodology's source. */
  readonly constantRate?: number;
}

export interface ComputeMetricsRequest extends MetricInputs {
  /** Epoch day; observations after it are not used. */
  readonly asOf: number;
  readonly windows: readonly string[];
  readonly methodology: Methodology;
  /** Defaults to every metric id, in interface order. */
  readonly metrics?: readonly MetricId[];
}

/** One line of `metrics --format json`. */
export interface MetricRow {
  readonly series_id: string;
  readonly window: string;
  readonly metric: MetricId;
  readonly value: number | null;
  readonly observations: number;
  readonly reason?: string;
  /** Keys of the error-level findings in the figure's window (src/reconcile/suspect-data.ts); absent on clean data. */
  readonly suspect_data?: readonly string[];
}

/** The whole `metrics --format json` answer. */
export interface MetricsAnswer {
  readonly as_of: string;
  readonly methodology: Methodology;
  readonly metrics: MetricRow[];
}

/** One figure to compute: a series, a window label, a metric, under a methodology. */
export interface MetricRequest {
  readonly seriesId: string;
  readonly asOf: number;
  readonly window: string;
  readonly metric: MetricId;
  readonly methodology: Methodology;
}

export interface MetricValue {
  readonly value: number | null;
  readonly observations: number;
  readonly reason?: string;
}

/** Every figure of the request; pass the run's calculator (built on the same inputs) to share its cache. */
export function computeMetrics(request: ComputeMetricsRequest, calculator = new MetricCalculator(request)): MetricsAnswer {
  const methodology = calculator.effectiveMethodology(request.methodology);
  const metrics = request.metrics ?? METRIC_IDS;
  const rows: MetricRow[] = [];
  const longestFirst = longestFirstOrder(request.windows);
  const stats: Outcome<WindowStatistics>[] = new Array(request.windows.length);
  for (const seriesId of calculator.seriesIds()) {
    // The longest window first, so the shorter ones are cut from its sample (LatestMonthlyFundSample).
    for (const at of longestFirst) stats[at] = calculator.statistics({ seriesId, asOf: request.asOf, window: request.windows[at], methodology });
    request.windows.forEach((window, at) => {
      for (const metric of metrics) rows.push(metricRow(seriesId, window, metric, stats[at], methodology));
    });
  }
  return { as_of: formatIsoDate(request.asOf), methodology: describeMethodology(methodology), metrics: rows };
}

/**
 * Positions of the windows, longest first (ties and unknown labels in their given order, unknown
 * labels first, so the first unknown label still throws first).
 */
function longestFirstOrder(windows: readonly string[]): number[] {
  const months = windows.map((window) => parseWindow(window) ?? Infinity);
  return windows.map((_, at) => at).sort((a, b) => months[b] - months[a] || a - b);
}

/**
 * A figure as a row of the answer: the figure's fields after the row's, `reason` only when there
 * is one. Built straight from the figure (not from a MetricValue): one object per row.
 */
function metricRow(series_id: string, window: string, metric: MetricId, stats: Outcome<WindowStatistics>, methodology: Methodology): MetricRow {
  if (!stats.ok) return { series_id, window, metric, value: null, observations: 0, reason: stats.reason };
  const observations = observationsOf(metric, stats.value, methodology);
  const figure = figureOrReason(metric, stats.value, methodology);
  return typeof figure === 'number'
    ? { series_id, window, metric, value: figure, observations }
    : { series_id, window, metric, value: null, observations, reason: figure.reason };
}

/** A metric from a window's statistics (or the window's own reason), as the answer reports it. */
function figureOf(metric: MetricId, stats: Outcome<WindowStatistics>, methodology: Methodology): MetricValue {
  if (!stats.ok) return { value: null, observations: 0, reason: stats.reason };
  const observations = observationsOf(metric, stats.value, methodology);
  const figure = figureOrReason(metric, stats.value, methodology);
  return typeof figure === 'number' ? { value: figure, observations } : { value: null, observations, reason: figure.reason };
}

function observationsOf(metric: MetricId, stats: WindowStatistics, methodology: Methodology): number {
  return metric === 'max_drawdown' ? drawdownObservations(stats, methodology) : stats.n;
}

/** The values max_drawdown runs over: every NAV observation, or the n + 1 sample points. */
function drawdownObservations(stats: WindowStatistics, methodology: Methodology): number {
  return methodology.drawdown === 'sampled' ? stats.n + 1 : stats.navObservations;
}

/**
 * Computes single figures cheaply and repeatedly: a window is sampled and its statistics built
 * once per (series, as-of, window, sampling settings); every other methodology dimension is
 * arithmetic on the cached statistics. Reconciliation keeps one calculator per run.
 */
export class MetricCalculator {
  private readonly masterById = new Map<string, SeriesMasterRecord>();
  /**
   * Statistics by series, sampling settings, window and as-of, one map per level: a look-up
   * builds no key string (the reconcile stage looks up every figure again, and the search its
   * variants; building and hashing a long key cost more than the rest of a look-up).
   */
  private readonly cache = new Map<string, StatisticsBySampling>();
  /** The sampling key of the methodology asked for last (most requests share one methodology object). */
  private lastMethodology: Methodology | null = null;
  private lastSamplingKey = '';
  private latestSeries: LatestSeriesStatistics | null = null;
  private readonly parts = new LatestSeriesParts();
  private readonly sources = new SourceParts();
  private readonly monthlyFunds = new LatestMonthlyFundSample();
  private readonly spans = new Map<string, Map<number, Map<number, WindowMonths>>>();
  /** The latest fund's slice, and every benchmark's and rate's asked for (a frame holds few of them). */
  private readonly funds: Slices;
  private readonly benchmarkLevels: Slices;
  private readonly rates: Slices | null;

  constructor(private readonly inputs: MetricInputs) {
    this.funds = new Slices(inputs.nav, 1);
    this.benchmarkLevels = new Slices(inputs.benchmarks, SOURCE_SLICES_KEPT);
    this.rates = inputs.rates ? new Slices(inputs.rates, SOURCE_SLICES_KEPT) : null;
    for (const record of inputs.master) {
      if (!this.masterById.has(record.series_id)) this.masterById.set(record.series_id, record);
    }
  }

  /** The methodology as applied: a command-line constant rate replaces its risk-free source. */
  effectiveMethodology(methodology: Methodology): Methodology {
    const rate = this.inputs.constantRate;
    return rate === undefined ? methodology : { ...methodology, risk_free: { source: 'constant', annual_rate: rate } };
  }

  /** Every series in the master or the NAV file, in ascending id order. */
  seriesIds(): string[] {
    const ids = new Set([...this.masterById.keys(), ...this.inputs.nav.ids]);
    return [...ids].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  }

  metric(request: MetricRequest): MetricValue {
    return figureOf(request.metric, this.statistics(request), this.effectiveMethodology(request.methodology));
  }

  /**
   * A figure under a methodology tried for one figure (the convention search's variants): a
   * window sampled anew for it is kept only while its series is the latest (`statistics`).
   */
  variantMetric(request: MetricRequest): MetricValue {
    return figureOf(request.metric, this.statistics(request, 'while the series is the latest'), this.effectiveMethodology(request.methodology));
  }

  /**
   * The window's statistics (cached), or why the window cannot be computed at all. Kept for the
   * run, or only while the series is the latest: the convention search samples a few dozen
   * variants of a breach's window, each holding its returns; kept for the run, they piled up
   * (about 120 MB at 10,000 series) and every young-generation collection copied them on.
   */
  statistics(request: Omit<MetricRequest, 'metric'>, kept: StatisticsKept = 'for the run'): Outcome<WindowStatistics> {
    const methodology = this.effectiveMethodology(request.methodology);
    const series = this.statisticsOfSeries(request.seriesId);
    const samplingKey = this.samplingKey(methodology);
    const forTheRun = kept === 'for the run';
    // A variant whose sampling is the run's (another denominator, another MAR …) reads the run's statistics.
    const keptForRun = forTheRun ? undefined : series.forTheRun.get(samplingKey)?.get(request.window)?.get(request.asOf);
    if (keptForRun) return keptForRun;
    const byAsOf = mapUnder(mapUnder(forTheRun ? series.forTheRun : series.whileLatest, samplingKey), request.window);
    let stats = byAsOf.get(request.asOf);
    if (!stats) {
      const reuse = this.parts.reuseFor(request, methodology);
      const window = this.windowRequest({ ...request, methodology });
      const sample = window.ok ? sampleWindow(window.value, this.partsFor(window.value, reuse)) : window;
      const logOf = (returns: Float64Array) => this.sources.logOf(returns) ?? (reuse ? reuse.logOf(returns) : log1pAll(returns));
      // A window sampled once (every window of the metrics stage) reads Σ ln(1 + r) of its fund
      // returns and never their logarithms: summed as they are taken, no array is made for them.
      const growthOf = (returns: Float64Array) => {
        const logs = this.sources.logOf(returns) ?? (reuse ? reuse.logOf(returns) : undefined);
        return logs === undefined ? sumOfLog1p(returns) : sum(logs);
      };
      stats = sample.ok ? { ok: true, value: windowStatistics(sample.value, logOf, growthOf) } : sample;
      byAsOf.set(request.asOf, stats);
    }
    return stats;
  }

  /**
   * The series' part of the cache, and its statistics kept only while it is the latest series;
   * the latest one is at hand, since figures come series by series.
   */
  private statisticsOfSeries(seriesId: string): LatestSeriesStatistics {
    if (seriesId !== this.latestSeries?.id) this.latestSeries = { id: seriesId, forTheRun: mapUnder(this.cache, seriesId), whileLatest: new Map() };
    return this.latestSeries;
  }

  /** The window's returns as sampled under the methodology, or why they cannot be (nothing shared with the cache). */
  sample(request: Omit<MetricRequest, 'metric'>): Outcome<WindowSample> {
    const window = this.windowRequest(request);
    return window.ok ? sampleWindow(window.value) : window;
  }

  /** What sampling a window needs: the fund, its benchmark and rate sources, the span, the settings. */
  private windowRequest(request: Omit<MetricRequest, 'metric'>): Outcome<SharedPartsRequest> {
    const methodology = this.effectiveMethodology(request.methodology);
    const fund = this.funds.of(request.seriesId);
    const span = this.spanOf(request.asOf, request.window, methodology.window_end);
    if (!fund || fund.dates.length === 0) return { ok: false, reason: `series ${request.seriesId} has no NAV observations` };
    return {
      ok: true,
      value: {
        fund,
        benchmark: this.benchmarkSource(request.seriesId, methodology),
        riskFree: this.riskFreeSource(request.seriesId, methodology),
        span,
        asOf: request.asOf,
        frequency: methodology.frequency,
        ratePerPeriod: (annualRate) => perPeriodRate(annualRate, methodology),
        ratePeriods: ratePeriodsOf(methodology),
        rateConversion: methodology.rate_conversion,
      },
    };
  }

  /** The window's months, made once per (as-of, window label, window end); an unknown label throws. */
  private spanOf(asOf: number, window: string, windowEnd: number): WindowMonths {
    const byWindowEnd = mapUnder(mapUnder(this.spans, window), asOf);
    let span = byWindowEnd.get(windowEnd);
    if (!span) {
      const months = parseWindow(window);
      if (months === null) throw new RangeError(unknownWindowMessage(window));
      byWindowEnd.set(windowEnd, (span = windowMonths(asOf, months, windowEnd)));
    }
    return span;
  }

  /**
   * Where this sampling keeps its parts: the fund's with the latest series' when the window was
   * sampled before, the benchmark's and the rate's across series (SourceParts).
   */
  private partsFor(window: SharedPartsRequest, reuse: SeriesReuse | null): SampleParts {
    const fund = (compute: () => Outcome<FundSample>) => this.monthlyFunds.sample(window, compute);
    return {
      fund: reuse ? (compute) => reuse.fund(() => fund(compute)) : fund,
      benchmark: this.sources.benchmarkKeeper(window),
      riskFree: this.sources.riskFreeKeeper(window),
    };
  }

  /** The benchmark a series is measured against: the methodology's override, else the master's. */
  benchmarkId(seriesId: string, methodology: Methodology): string | null {
    return methodology.benchmark ?? this.masterById.get(seriesId)?.benchmark_id ?? null;
  }

  private benchmarkSource(seriesId: string, methodology: Methodology): BenchmarkSource {
    const id = this.benchmarkId(seriesId, methodology);
    if (id === null) {
      return this.masterById.has(seriesId)
        ? failure(`no benchmark is mapped to series ${seriesId} in the series master`)
        : failure(`series ${seriesId} is not in the series master, so it has no benchmark`);
    }
    const levels = this.benchmarkLevels.of(id);
    return levels && levels.dates.length > 0 ? success({ id, levels }) : failure(`benchmark ${id} has no levels`);
  }

  private riskFreeSource(seriesId: string, methodology: Methodology): RiskFreeSource {
    const source = methodology.risk_free;
    if (source.source === 'none') return success({ annualRate: 0 });
    if (source.source === 'constant') return success({ annualRate: source.annual_rate });
    const id = source.rate_id ?? this.masterById.get(seriesId)?.rate_id ?? null;
    if (id === null) {
      return failure(`no risk-free rate: series ${seriesId} has no rate_id in the series master and no constant rate was given`);
    }
    if (!this.inputs.rates) {
      return failure(`no risk-free rates were given for rate ${id}: give a rate file or a constant rate`);
    }
    const rates = this.rates!.of(id);
    return rates && rates.dates.length > 0 ? success({ id, rates }) : failure(`risk-free rate ${id} has no observations`);
  }

  /**
   * Everything that changes a window's sampling or its risk-free returns (the dimensions marked
   * `resamples` in METHODOLOGY_DIMENSIONS); the other dimensions are arithmetic on its statistics.
   */
  private samplingKey(m: Methodology): string {
    if (m !== this.lastMethodology) {
      this.lastMethodology = m;
      this.lastSamplingKey = `${m.frequency}|${m.window_end}|${m.benchmark ?? ''}|${riskFreeKey(m)}|${ratePeriodsOf(m)}|${m.rate_conversion}`;
    }
    return this.lastSamplingKey;
  }
}

/**
 * Series slices of a frame, each made once while kept: a slice is three typed-array views, and
 * the convention search samples a breach's window anew a few dozen times, each time with the
 * same fund, benchmarks and rate. At most `atMost` are kept; then they are dropped together.
 */
class Slices {
  private readonly kept = new Map<string, SeriesSlice | undefined>();

  constructor(
    private readonly frame: SeriesFrame,
    private readonly atMost: number,
  ) {}

  of(id: string): SeriesSlice | undefined {
    if (this.kept.has(id)) return this.kept.get(id);
    if (this.kept.size >= this.atMost) this.kept.clear();
    const slice = findSeries(this.frame, id);
    this.kept.set(id, slice);
    return slice;
  }
}

/** Benchmark and rate slices kept: more than a feed's benchmarks or rates usually number. */
const SOURCE_SLICES_KEPT = 256;

/** How long a window's statistics are kept: for the run, or only while its series is the latest. */
export type StatisticsKept = 'for the run' | 'while the series is the latest';

/** Statistics by sampling key, window and as-of. */
type StatisticsBySampling = Map<string, Map<string, Map<number, Outcome<WindowStatistics>>>>;

/** The latest series' statistics: those kept for the run (its part of the cache), and those kept while it is the latest. */
interface LatestSeriesStatistics {
  readonly id: string;
  readonly forTheRun: StatisticsBySampling;
  readonly whileLatest: StatisticsBySampling;
}

/** A window request with the two rate settings the risk-free part depends on, for its key. */
interface SharedPartsRequest extends WindowRequest {
  readonly ratePeriods: number;
  readonly rateConversion: Methodology['rate_conversion'];
}

/** The map under `key` in `map`, made on first use. */
function mapUnder<K, V extends Map<unknown, unknown>>(map: Map<K, V>, key: K): V {
  let child = map.get(key);
  if (child === undefined) map.set(key, (child = new Map() as V));
  return child;
}

type PartKeeper = SampleParts['benchmark'];

/**
 * The benchmark's and the risk-free parts of window samples, kept across series: they depend on
 * the fund only through its sample days (src/metrics/sampling.ts, SampleParts), and the funds of
 * one calendar have the same days, so the next series' window usually reuses them. A few parts
 * are kept per key (source, span, frequency, rate settings), each with the days it was computed
 * on, so funds on a few calendars share them too; a part on other days replaces the one used
 * least recently. The kept returns' ln(1 + r) are computed once. Memory stays small: a few
 * hundred keys at most (benchmarks × frequencies × window ends × windows).
 */
class SourceParts {
  /** Every kept returns array, with its logarithms once computed (null before). */
  private readonly logs = new Map<Float64Array, Float64Array | null>();

  /** By span (made once per as-of, window and window end), frequency and benchmark. */
  private readonly benchmarkParts = new Map<WindowMonths, Map<string, Map<string, KeptPart[]>>>();
  /** By span, frequency, rate id (or constant annual rate), periods a year and conversion. */
  private readonly riskFreeParts = new Map<WindowMonths, Map<string, Map<string | number, Map<number, Map<string, KeptPart[]>>>>>();

  /** Where the window's benchmark returns are kept; a missing benchmark's reason names the series, so it is never kept. */
  benchmarkKeeper(window: SharedPartsRequest): PartKeeper {
    if (!window.benchmark.ok) return (_days, compute) => compute();
    const kept = keptUnder(mapUnder(mapUnder(this.benchmarkParts, window.span), window.frequency), window.benchmark.value.id);
    return (days, compute) => this.part(kept, days, compute);
  }

  /** Where the window's risk-free returns are kept; a missing rate's reason may name the series, so it is never kept. */
  riskFreeKeeper(window: SharedPartsRequest): PartKeeper {
    if (!window.riskFree.ok) return (_days, compute) => compute();
    const source = window.riskFree.value;
    const byPeriods = mapUnder(mapUnder(mapUnder(this.riskFreeParts, window.span), window.frequency), 'annualRate' in source ? source.annualRate : source.id);
    const kept = keptUnder(mapUnder(byPeriods, window.ratePeriods), window.rateConversion);
    return (days, compute) => this.part(kept, days, compute);
  }

  private part(kept: KeptPart[], days: Int32Array, compute: () => Outcome<Float64Array>): Outcome<Float64Array> {
    const at = keptIndex(kept, days);
    if (at >= 0) {
      const entry = kept[at];
      entry.lastAskedWith = days;
      if (at > 0) {
        kept.splice(at, 1);
        kept.unshift(entry);
      }
      return entry.part;
    }
    const part = compute();
    kept.unshift({ days, part, lastAskedWith: days });
    if (part.ok) this.logs.set(part.value, null);
    const dropped = kept.length > PARTS_KEPT_PER_KEY ? kept.pop() : undefined;
    if (dropped?.part.ok) this.logs.delete(dropped.part.value);
    return part;
  }

  /** ln(1 + r) of a kept returns array, or undefined for an array not kept here. */
  logOf(returns: Float64Array): Float64Array | undefined {
    const logs = this.logs.get(returns);
    if (logs !== null) return logs;
    const computed = log1pAll(returns);
    this.logs.set(returns, computed);
    return computed;
  }
}

function keptUnder<K>(map: Map<K, KeptPart[]>, key: K): KeptPart[] {
  let kept = map.get(key);
  if (kept === undefined) map.set(key, (kept = []));
  return kept;
}

interface KeptPart {
  readonly days: Int32Array;
  readonly part: Outcome<Float64Array>;
  /**
   * The days array this part was last found for: the convention search asks with one series'
   * days array again and again, and a daily window's days are over a thousand to compare.
   */
  lastAskedWith: Int32Array;
}

/** The kept part computed on these days, or −1. */
function keptIndex(kept: readonly KeptPart[], days: Int32Array): number {
  for (let at = 0; at < kept.length; at++) if (kept[at].lastAskedWith === days) return at;
  for (let at = 0; at < kept.length; at++) if (sameDays(kept[at].days, days)) return at;
  return -1;
}

/** Parts kept per key: room for a few calendars (the standard universe has two). */
const PARTS_KEPT_PER_KEY = 4;

function sameDays(a: Int32Array, b: Int32Array): boolean {
  if (a === b) return true;
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

/**
 * The latest fund's longest monthly sample for one as-of and window end, from which its shorter
 * windows ending in the same month are cut (sampling.ts, laterMonthlyStart): the metrics stage's
 * 1y and 3y windows are the last months of its 5y window, which it therefore samples first.
 */
class LatestMonthlyFundSample {
  private kept: { readonly fund: Observations; readonly asOf: number; readonly span: WindowMonths; readonly sample: FundSample & { readonly points: Int32Array } } | null = null;

  sample(window: SharedPartsRequest, compute: () => Outcome<FundSample>): Outcome<FundSample> {
    if (window.frequency !== 'monthly') return compute();
    const kept = this.kept;
    const sameEnd = kept !== null && kept.fund === window.fund && kept.asOf === window.asOf && kept.span.endMonth === window.span.endMonth;
    if (sameEnd && kept.span.startMonth <= window.span.startMonth) {
      return { ok: true, value: laterMonthlyStart(window.fund, kept.sample, window.span.startMonth - kept.span.startMonth) };
    }
    const sampled = compute();
    if (sampled.ok && sampled.value.points !== null) {
      this.kept = { fund: window.fund, asOf: window.asOf, span: window.span, sample: { ...sampled.value, points: sampled.value.points } };
    }
    return sampled;
  }
}

/** What a window sampled again for the latest series reuses: its fund part, and logarithms once computed. */
interface SeriesReuse {
  readonly fund: SampleParts['fund'];
  readonly logOf: (returns: Float64Array) => Float64Array;
}

/**
 * The fund parts of the latest series' window samples (src/metrics/sampling.ts, SampleParts),
 * each under the settings it depends on, and ln(1 + r) of their returns. Only one series' parts
 * are kept: the convention search asks for one figure's variants together, and figures come
 * series by series, so memory stays that of one series however large the universe. A window
 * sampled once (every window of the metrics stage) keeps nothing: keeping costs more than it saves there.
 */
class LatestSeriesParts {
  private seriesId: string | null = null;
  private readonly sampled = new Set<string>();
  private readonly kept = new Map<string, Outcome<FundSample>>();
  private readonly logs = new Map<Float64Array, Float64Array>();

  /** What to reuse for this sampling of a window, or null the first time the series' window is sampled. */
  reuseFor(request: Omit<MetricRequest, 'metric'>, m: Methodology): SeriesReuse | null {
    if (request.seriesId !== this.seriesId) {
      this.sampled.clear();
      this.kept.clear();
      this.logs.clear();
      this.seriesId = request.seriesId;
    }
    const label = `${request.asOf}|${request.window}`;
    if (!this.sampled.has(label)) {
      this.sampled.add(label);
      return null;
    }
    const key = `${label}|${m.frequency}|${m.window_end}`;
    return {
      fund: (compute) => this.keep(key, compute),
      logOf: (returns) => this.logOf(returns),
    };
  }

  private keep(key: string, compute: () => Outcome<FundSample>): Outcome<FundSample> {
    let part = this.kept.get(key);
    if (!part) this.kept.set(key, (part = compute()));
    return part;
  }

  /** ln(1 + r) of a kept returns array, computed once (the arrays are never written after sampling). */
  private logOf(returns: Float64Array): Float64Array {
    let logs = this.logs.get(returns);
    if (!logs) this.logs.set(returns, (logs = log1pAll(returns)));
    return logs;
  }
}

function riskFreeKey(m: Methodology): string {
  const source = m.risk_free;
  if (source.source === 'series') return `series:${source.rate_id ?? ''}`;
  return source.source === 'constant' ? `constant:${source.annual_rate}` : 'none';
}

/** One figure, for callers that keep a calculator (reconciliation calls this with many variants). */
export function computeMetric(calculator: MetricCalculator, request: MetricRequest): MetricValue {
  return calculator.metric(request);
}

export function unknownWindowMessage(label: string): string {
  return `unknown window "${label}": write a whole number of years or months, such as 3y or 6m`;
}
