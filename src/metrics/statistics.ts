import { PairMoments, SeriesMoments, TargetSums } from './moments.js';
import type { WindowSample } from './sampling.js';

/**
 * A window's sufficient statistics, built in one pass over its returns. Every metric, under every
 * methodology that shares the window's sampling, is then a few arithmetic operations on these.
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
export function windowStatistics(sample: WindowSample, logOf: (returns: Float64Array) => Float64Array = log1pAll): WindowStatistics {
  const n = sample.fund.length;
  const zeros = new Float64Array(n);
  const fund = sample.fund;
  const benchmark = sample.benchmark ?? zeros;
  const riskFree = sample.riskFree ?? zeros;
  const logFund = logOf(fund);
  const logBenchmark = logOf(benchmark);
  return {
    n,
    simple: basisStatistics(fund, benchmark, riskFree),
    log: basisStatistics(logFund, logBenchmark, riskFree),
    growth: { fund: sum(logFund), benchmark: sum(logBenchmark), riskFree: sum(logOf(riskFree)) },
    maxDrawdown: maxDrawdown(sample.navPath),
    navObservations: sample.navPath.length,
    sampledMaxDrawdown: maxDrawdownOfReturns(fund),
    days: sample.pointDays.length > 0 ? sample.pointDays[sample.pointDays.length - 1] - sample.pointDays[0] : 0,
    fundReturns: { simple: fund, log: logFund },
    fixedTargets: new Map(),
    benchmarkReason: sample.benchmarkReason,
    riskFreeReason: sample.riskFreeReason,
  };
}

/** All of one basis' moments in a single pass over fund, benchmark and risk-free returns. */
export function basisStatistics(fund: Float64Array, benchmark: Float64Array, riskFree: Float64Array): BasisStatistics {
  const stats = {
    raw: new PairMoments(),
    excess: new PairMoments(),
    active: new SeriesMoments(),
    belowRiskFree: new TargetSums(),
    belowZero: new TargetSums(),
  };
  for (let i = 0; i < fund.length; i++) {
    const p = fund[i];
    const b = benchmark[i];
    const f = riskFree[i];
    stats.raw.add(b, p);
    stats.excess.add(b - f, p - f);
    stats.active.add(p - b);
    stats.belowRiskFree.add(p, f);
    stats.belowZero.add(p, 0);
  }
  return stats;
}

/** The largest fall from a running peak, as a positive fraction of the peak; NaN if a value is not positive. */
export function maxDrawdown(values: ArrayLike<number>): number {
  let peak = -Infinity;
  let deepest = 0;
  for (let i = 0; i < values.length; i++) {
    const value = values[i];
    if (!(value > 0 && value < Infinity)) return NaN;
    if (value > peak) peak = value;
    else deepest = Math.max(deepest, 1 - value / peak);
  }
  return deepest;
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

function sum(values: Float64Array): number {
  let total = 0;
  for (let i = 0; i < values.length; i++) total += values[i];
  return total;
}
