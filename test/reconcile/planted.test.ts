import { describe, expect, it } from 'vitest';
import type { MetricId } from '../../src/metrics/kernels.js';
import { DEFAULT_METHODOLOGY, type MethodologyChanges } from '../../src/metrics/methodology.js';
import { reconcile, type ReconcileResult } from '../../src/reconcile/reconcile.js';
import { figureUnder, universe, vendorRow } from './universe.js';

/**
 * Each methodology dimension's variant planted in a vendor file built from the invented
 * universe: the vendor's figure is the engine's figure under the variant, printed to four
 * decimals. The planted change must be the first explanation, and a gross error (×1.25, a flipped
 * sign) must not be explained by anything.
 */
const { data } = universe();

const PLANTED: ReadonlyArray<{ metric: MetricId; changes: Record<string, unknown> }> = [
  { metric: 'std_dev', changes: { frequency: 'weekly' } },
  { metric: 'std_dev', changes: { frequency: 'daily' } },
  { metric: 'std_dev', changes: { annualization: 252 } },
  { metric: 'sharpe', changes: { annualization: 52 } },
  { metric: 'std_dev', changes: { sd_denominator: 'population' } },
  { metric: 'tracking_error', changes: { sd_denominator: 'population' } },
  { metric: 'std_dev', changes: { return_type: 'log' } },
  { metric: 'alpha', changes: { regression: 'raw' } },
  { metric: 'alpha', changes: { alpha_form: 'jensen_geometric' } },
  { metric: 'alpha', changes: { alpha_form: 'excess_return' } },
  { metric: 'sortino', changes: { mar: 'zero' } },
  { metric: 'downside_deviation', changes: { mar: 'zero' } },
  { metric: 'downside_deviation', changes: { dd_denominator: 'below' } },
  { metric: 'return_annualized', changes: { window_end: -1 } },
  { metric: 'std_dev', changes: { window_end: -2 } },
  { metric: 'return_annualized', changes: { window_end: -3 } },
  { metric: 'max_drawdown', changes: { window_end: -1 } },
  { metric: 'beta', changes: { benchmark: 'other' } },
  { metric: 'std_dev', changes: { scale: 'percent' } },
  { metric: 'alpha', changes: { regression: 'raw', scale: 'percent' } },
  { metric: 'sharpe', changes: { return_type: 'log', annualization: 252 } },
  // The dimensions docs/methodology.md added later: each must be found when a vendor used it.
  { metric: 'alpha', changes: { alpha_form: 'compounded' } },
  { metric: 'sortino', changes: { mar: 0.03 } },
  { metric: 'downside_deviation', changes: { mar: 0.05 } },
  { metric: 'sharpe', changes: { rate_conversion: 'compound' } },
  { metric: 'sharpe', changes: { ratio_scale: 'per_period' } },
  { metric: 'information_ratio', changes: { ratio_scale: 'per_period' } },
  { metric: 'max_drawdown', changes: { drawdown: 'sampled' } },
  { metric: 'return_annualized', changes: { return_annualization: 'calendar_days' } },
  { metric: 'sharpe', changes: { rate_periods: 'annualization', annualization: 252 } },
];

const OTHER_BENCHMARK: Record<string, string> = { 'FUND-A': 'BMK-NARROW', 'FUND-C': 'BMK-WIDE' };

/** The planted changes for a series: "other" names the benchmark the series is not measured against. */
function plantedFor(seriesId: string, changes: Record<string, unknown>): Record<string, unknown> {
  return changes.benchmark === 'other' ? { ...changes, benchmark: OTHER_BENCHMARK[seriesId] } : changes;
}

/** The vendor's text: `decimals` decimals, or as many decimals of a percent written without its unit. */
function printed(metric: MetricId, changes: Record<string, unknown>, seriesId: string, window: string, decimals: number): string {
  const { scale, ...methodology } = changes;
  const value = figureUnder(data, seriesId, window, metric, methodology as MethodologyChanges);
  return scale === 'percent' ? (value * 100).toFixed(decimals - 2) : value.toFixed(decimals);
}

function reconcileRows(rows: ReturnType<typeof vendorRow>[]): ReconcileResult[] {
  return reconcile({ vendor: rows, data, findings: [] }, { methodology: DEFAULT_METHODOLOGY }).results;
}

const CASES = ['1y', '3y', '5y'].flatMap((window) =>
  ['FUND-A', 'FUND-C'].flatMap((seriesId) => PLANTED.map(({ metric, changes }) => ({ window, seriesId, metric, changes: plantedFor(seriesId, changes) }))),
);

describe('a planted convention, printed to six decimals, is the first explanation', () => {
  it.each(CASES)('$seriesId $window $metric under $changes', ({ window, seriesId, metric, changes }) => {
    const [result] = reconcileRows([vendorRow(seriesId, window, metric, printed(metric, changes, seriesId, window, 6))]);
    if (result.status === 'breach') {
      expect(result.explanations[0]).toMatchObject({ kind: 'convention', changes });
    } else {
      // The variant moves this figure by no more than the tolerance: nothing to explain.
      expect(Math.abs(result.difference!)).toBeLessThanOrEqual(result.tolerance + 1e-9);
    }
  });

  it('most planted variants are breaches, so the test above is not vacuous', () => {
    const breaches = CASES.filter(({ window, seriesId, metric, changes }) => {
      const [result] = reconcileRows([vendorRow(seriesId, window, metric, printed(metric, changes, seriesId, window, 6))]);
      return result.status === 'breach';
    });
    expect(breaches.length).toBeGreaterThanOrEqual(0.9 * CASES.length);
  });
});

describe('a planted convention, printed to four decimals as vendors do', () => {
  it.each(CASES)('$seriesId $window $metric under $changes is among the explanations, first unless the print cannot tell', ({ window, seriesId, metric, changes }) => {
    const [result] = reconcileRows([vendorRow(seriesId, window, metric, printed(metric, changes, seriesId, window, 4))]);
    if (result.status !== 'breach') return expect(Math.abs(result.difference!)).toBeLessThanOrEqual(Math.max(result.tolerance, result.printed_half_unit) + 1e-9);
    const position = result.explanations.findIndex((e) => e.kind === 'convention' && JSON.stringify(e.changes) === JSON.stringify(changes));
    if (position < 0 && Object.keys(changes).length > 1) {
      // A pair is searched only when no single change reproduces the figure; then the single is part of the pair.
      const first = result.explanations[0];
      expect(first.kind === 'convention' && Object.entries(first.changes).every(([k, v]) => changes[k] === v)).toBe(true);
      return;
    }
    expect(position).toBeGreaterThanOrEqual(0);
    // Anything ranked before it rounds to the same printed figure, or needs fewer changes.
    for (const earlier of result.explanations.slice(0, position)) {
      const fewer = earlier.kind === 'convention' && Object.keys(earlier.changes).length < Object.keys(changes).length;
      const sameScale = earlier.kind === 'convention' && 'scale' in changes === 'scale' in earlier.changes;
      if (!fewer && sameScale) expect(Math.abs(earlier.computed! - result.vendor)).toBeLessThanOrEqual(result.printed_half_unit + 1e-9);
    }
  });
});

describe('gross errors are not explained', () => {
  const METRICS: MetricId[] = ['return_annualized', 'std_dev', 'downside_deviation', 'beta', 'alpha', 'sharpe', 'sortino', 'tracking_error', 'information_ratio', 'treynor', 'max_drawdown'];
  const GROSS = METRICS.flatMap((metric) => ['1y', '3y'].flatMap((window) => [
    { metric, window, error: '×1.25', apply: (v: number) => v * 1.25 },
    { metric, window, error: 'flipped sign', apply: (v: number) => -v },
  ]));
  it.each(GROSS)('FUND-B $window $metric $error', ({ metric, window, apply }) => {
    const value = figureUnder(data, 'FUND-B', window, metric);
    const [result] = reconcileRows([vendorRow('FUND-B', window, metric, apply(value).toFixed(4))]);
    expect(result.status).toBe('breach');
    expect(result.explanations).toEqual([]);
  });
});
