import { describe, expect, it } from 'vitest';
import { DEFAULT_METHODOLOGY, MetricCalculator, withChanges, type MethodologyChanges } from '../../src/metrics/index.js';
import { METRIC_IDS } from '../../src/metrics/kernels.js';
import { SeededRandom } from '../../src/random.js';
import { AS_OF, universe } from '../reconcile/universe.js';

/**
 * The calculator keeps the latest series' fund parts, and the benchmark and risk-free returns of
 * each window across series, and reuses them across methodology variants, the way the convention
 * search asks for them (test/metrics/shared-parts.test.ts puts funds on several calendars).
 * Reuse is only a speed-up: every figure must be exactly (bit for bit) what a fresh calculator
 * computes for that one figure alone, whatever order the requests come in.
 */
describe('sample parts reused across variants', () => {
  const { data } = universe();
  const series = ['FUND-A', 'FUND-B', 'FUND-C'];
  const windows = ['1y', '3y'];
  const variants: MethodologyChanges[] = [];
  for (const frequency of ['monthly', 'weekly', 'daily'] as const) {
    for (const window_end of [0, -1]) {
      for (const benchmark of [null, 'BMK-WIDE', 'BMK-NARROW']) {
        for (const rate_conversion of ['simple', 'compound'] as const) {
          variants.push({ frequency, window_end, benchmark, rate_conversion, rate_periods: rate_conversion === 'compound' ? 'annualization' : 'frequency', annualization: null });
        }
      }
    }
  }
  const requests = series.flatMap((seriesId) =>
    windows.flatMap((window) => variants.flatMap((changes) => METRIC_IDS.map((metric) => ({ seriesId, window, metric, changes })))),
  );


  it.each([
    ['series by series, as a reconciliation asks', (items: typeof requests) => items],
    ['in a random order, series interleaved', (items: typeof requests) => new SeededRandom(7).shuffle(items)],
  ])('gives every figure a fresh calculator gives, %s', (_, order) => {
    const shared = new MetricCalculator(data);
    const sampled = order(requests).filter((_, k) => k % 5 === 0);
    for (const { seriesId, window, metric, changes } of sampled) {
      const methodology = withChanges(DEFAULT_METHODOLOGY, changes);
      const request = { seriesId, asOf: AS_OF, window, metric, methodology };
      const alone = new MetricCalculator(data).metric(request);
      const reused = shared.metric(request);
      expect(Object.is(reused.value, alone.value), `${seriesId} ${window} ${metric} ${JSON.stringify(changes)}: ${reused.value} vs ${alone.value}`).toBe(true);
      expect(reused.reason).toBe(alone.reason);
    }
  });
});
