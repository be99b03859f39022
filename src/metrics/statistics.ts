import { PairMoments, SeriesMoments, TargetSums } from './moments.js';
import type { WindowSample } from './sampling.js';

/**
 * A window's sufficient statistics, each part built by its own pass over the returns when a
 * figure first reads it. Every metric, under every methodology that shares the window's
 * sampling, is then a few arithmetic operations on these.
 */

/** Moments of the returns in one basis: simple returns r, or log returns ln(1 + r). */
export interface BasisStatistics {
  /** Benchmark (x, the explanatory variable) and fund (y). */
  readonly raw: PairMoments;
  /** Benchmark excess (x = r_b − rf) and fund excess (y = r − rf). */
  readonly excess: PairMoments;
  /** Active return: fund minus benchmark. */
  readonly active: SeriesMoments;
  /** Fund returns about a minimum acceptable return of the risk-free rate. */
  readonly belowRiskFree: TargetSums;
  /** Fund returns about a minimum acceptable return of zero. */
  readonly belowZero: TargetSums;
}

export interface WindowStatistics {
  /** Periods (returns) in the window. */
  readonly n: number;
  readonly simple: BasisStatistics;
  readonly log: BasisStatistics;
  /** Σ ln(1 + r): compounding in log space, for annualised (geometric) returns. */
  readonly growth: { readonly fund: number; readonly benchmark: number; readonly riskFree: number };
  /**
   * Largest peak-to-trough fall of the NAV path, a positive decimal: 0 when it never falls,
   * NaN when a NAV on the path is not a positive number.
   */
  readonly maxDrawdown: number;
  readonly navObservations: number;
  /** Largest fall of the fund's value at its sample points only (`drawdown: sampled`), from its returns. */
  readonly sampledMaxDrawdown: number;
  /** Calendar days from the first sample point to the last (`return_annualization: calendar_days`). */
  readonly days: number;
  /**
   * The fund's returns in each basis, kept for sums about a fixed minimum acceptable return
   * (`mar: 0.02`), which are built on first use and memoised in `fixedTargets`.
   */
  readonly fundReturns: { readonly simple: Float64Array; readonly log: Float64Array };
  readonly fixedTargets: Map<string, TargetSums>;
  /** Why benchmark figures cannot be computed, or null when they can. */
  readonly benchmarkReason: string | null;
  /** Why risk-free dependent figures cannot be computed, or null when they can. */
  readonly riskFreeReason: string | null;
}

/**
 * `logOf` gives ln(1 + r) of a returns array: log1pAll, or a memo of it when the caller hands the
 * same arrays to many windows (src/metrics/compute.ts, for the convention search's variants).
 */
export function windowStatistics(
  sample: WindowSample,
  logOf: (returns: Float64Array) => Float64Array = log1pAll,
  growthOf: (returns: Float64Array) => number = (returns) => sum(logOf(returns)),
): WindowStatistics {
  return new LazyWindowStatistics(sample, logOf, growthOf);
}

/**
 * A window's statistics, each part built on first use from the sample it keeps: a figure reads
 * only some of them (a beta never reads the drawdown, a figure on simple returns never the log
 * moments), and the convention search builds many windows to read one figure from each. A part
 * is the same function of the same returns whenever it is built, so the figures are those of
 * building every part at once.
 */
class LazyWindowStatistics implements WindowStatistics {
  readonly n: number;
  readonly navObservations: number;
  readonly days: number;
  readonly fixedTargets = new Map<string, TargetSums>();
  readonly benchmarkReason: string | null;
  readonly riskFreeReason: string | null;
  private readonly fund: Float64Array;
  /** The benchmark's and the rate's returns, zeros where the sample has none. */
  private readonly benchmark: Float64Array;
  private readonly riskFree: Float64Array;
  private builtSimple: BasisStatistics | undefined;
  private builtLog: BasisStatistics | undefined;
  private builtGrowth: WindowStatistics['growth'] | undefined;
  private builtMaxDrawdown: number | undefined;
  private builtSampledMaxDrawdown: number | undefined;
  private builtFundReturns: WindowStatistics['fundReturns'] | undefined;

  constructor(
    private readonly sample: WindowSample,
    private readonly logOf: (returns: Float64Array) => Float64Array,
    /** Σ ln(1 + r) of a returns array: the sum of `logOf`'s answer, to the last bit. */
    private readonly growthOf: (returns: Float64Array) => number,
  ) {
    this.n = sample.fund.length;
    this.fund = sample.fund;
    const zeros = sample.benchmark && sample.riskFree ? null : new Float64Array(this.n);
    this.benchmark = sample.benchmark ?? zeros!;
    this.riskFree = sample.riskFree ?? zeros!;
    this.navObservations = sample.navPath.length;
    const days = sample.pointDays;
    this.days = days.length > 0 ? days[days.length - 1] - days[0] : 0;
    this.benchmarkReason = sample.benchmarkReason;
    this.riskFreeReason = sample.riskFreeReason;
  }

  get simple(): BasisStatistics {
    return (this.builtSimple ??= basisStatistics(this.fund, this.benchmark, this.riskFree));
  }

  get log(): BasisStatistics {
    return (this.builtLog ??= basisStatistics(this.logOf(this.fund), this.logOf(this.benchmark), this.riskFree));
  }

  get growth(): WindowStatistics['growth'] {
    return (this.builtGrowth ??= {
      fund: this.growthOf(this.fund),
      benchmark: this.growthOf(this.benchmark),
      riskFree: this.growthOf(this.riskFree),
    });
  }

  get maxDrawdown(): number {
    return (this.builtMaxDrawdown ??= maxDrawdown(this.sample.navPath));
  }

  get sampledMaxDrawdown(): number {
    return (this.builtSampledMaxDrawdown ??= maxDrawdownOfReturns(this.fund));
  }

  get fundReturns(): WindowStatistics['fundReturns'] {
    return (this.builtFundReturns ??= { simple: this.fund, log: this.logOf(this.fund) });
  }
}

/**
 * One basis' moments, each built on first use by its own pass over the returns (a beta reads only
 * the excess pair, a standard deviation only the raw one). Each accumulator sees the same values
 * in the same order as in one pass over all of them, so its sums are the same to the last bit.
 */
export function basisStatistics(fund: Float64Array, benchmark: Float64Array, riskFree: Float64Array): BasisStatistics {
  return new LazyBasisStatistics(fund, benchmark, riskFree);
}

class LazyBasisStatistics implements BasisStatistics {
  private builtRaw: PairMoments | undefined;
  private builtExcess: PairMoments | undefined;
  private builtActive: SeriesMoments | undefined;
  private builtBelowRiskFree: TargetSums | undefined;
  private builtBelowZero: TargetSums | undefined;

  constructor(
    private readonly fund: Float64Array,
    private readonly benchmark: Float64Array,
    private readonly riskFree: Float64Array,
  ) {}

  get raw(): PairMoments {
    if (this.builtRaw) return this.builtRaw;
    const { fund, benchmark } = this;
    const raw = new PairMoments();
    for (let i = 0; i < fund.length; i++) raw.add(benchmark[i], fund[i]);
    return (this.builtRaw = raw);
  }

  get excess(): PairMoments {
    if (this.builtExcess) return this.builtExcess;
    const { fund, benchmark, riskFree } = this;
    const excess = new PairMoments();
    for (let i = 0; i < fund.length; i++) {
      const f = riskFree[i];
      excess.add(benchmark[i] - f, fund[i] - f);
    }
    return (this.builtExcess = excess);
  }

  get active(): SeriesMoments {
    if (this.builtActive) return this.builtActive;
    const { fund, benchmark } = this;
    const active = new SeriesMoments();
    for (let i = 0; i < fund.length; i++) active.add(fund[i] - benchmark[i]);
    return (this.builtActive = active);
  }

  get belowRiskFree(): TargetSums {
    if (this.builtBelowRiskFree) return this.builtBelowRiskFree;
    const { fund, riskFree } = this;
    const sums = new TargetSums();
    for (let i = 0; i < fund.length; i++) sums.add(fund[i], riskFree[i]);
    return (this.builtBelowRiskFree = sums);
  }

  get belowZero(): TargetSums {
    if (this.builtBelowZero) return this.builtBelowZero;
    const { fund } = this;
    const sums = new TargetSums();
    for (let i = 0; i < fund.length; i++) sums.add(fund[i], 0);
    return (this.builtBelowZero = sums);
  }
}

/**
 * The largest fall from a running peak, as a positive fraction of the peak; NaN if a value is not
 * positive. Under one peak, 1 − value / peak is largest at the lowest value (a division by a
 * positive number and a subtraction from 1 never reverse an order, even rounded), so each peak's
 * fall is computed once from its trough instead of at every value: the same number, one division
 * per peak instead of one per value.
 */
export function maxDrawdown(values: ArrayLike<number>): number {
  let peak = -Infinity;
  let trough = Infinity;
  let deepest = 0;
  for (let i = 0; i < values.length; i++) {
    const value = values[i];
    if (!(value > 0 && value < Infinity)) return NaN;
    if (value > peak) {
      if (trough !== Infinity) deepest = Math.max(deepest, 1 - trough / peak);
      peak = value;
      trough = Infinity;
    } else if (value < trough) {
      trough = value;
    }
  }
  return trough === Infinity ? deepest : Math.max(deepest, 1 - trough / peak);
}

/** The largest fall of the value path 1, (1 + r_1), (1 + r_1)(1 + r_2), …: the drawdown at the sample points. */
export function maxDrawdownOfReturns(returns: ArrayLike<number>): number {
  let value = 1;
  let peak = 1;
  let deepest = 0;
  for (let i = 0; i < returns.length; i++) {
    value *= 1 + returns[i];
    if (value > peak) peak = value;
    else deepest = Math.max(deepest, 1 - value / peak);
  }
  return deepest;
}

/**
 * Sums of a basis' fund returns about a fixed per-period target, built once per (basis, target)
 * and kept with the window's statistics, so a search over fixed MARs passes the returns once each.
 */
export function fixedTargetSums(stats: WindowStatistics, basis: 'simple' | 'log', target: number): TargetSums {
  const key = `${basis}:${target}`;
  let sums = stats.fixedTargets.get(key);
  if (!sums) {
    sums = new TargetSums();
    const returns = stats.fundReturns[basis];
    for (let i = 0; i < returns.length; i++) sums.add(returns[i], target);
    stats.fixedTargets.set(key, sums);
  }
  return sums;
}

export function log1pAll(values: Float64Array): Float64Array {
  const logs = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) logs[i] = Math.log1p(values[i]);
  return logs;
}

/**
 * Σ ln(1 + r) in index order without keeping the logarithms: the same additions of the same
 * numbers as sum(log1pAll(values)), so the same sum to the last bit, with no array made.
 */
export function sumOfLog1p(values: Float64Array): number {
  let total = 0;
  for (let i = 0; i < values.length; i++) total += Math.log1p(values[i]);
  return total;
}

export function sum(values: Float64Array): number {
  let total = 0;
  for (let i = 0; i < values.length; i++) total += values[i];
  return total;
}
