import { describe, expect, it } from 'vitest';
import { DEFAULT_METHODOLOGY, DIMENSION_CHOICES } from '../../src/metrics/methodology.js';
import { METRIC_IDS } from '../../src/metrics/kernels.js';
import { affects, candidatesFor } from '../../src/reconcile/candidates.js';

const context = { base: DEFAULT_METHODOLOGY, unit: 'decimal' as const, benchmark: 'BMK-A', benchmarks: ['BMK-A', 'BMK-B'] };

describe('the candidate changes', () => {
  it('search every dimension with fixed choices, every common annualisation, three earlier month-ends, the other benchmarks and the scale', () => {
    const dimensions = new Set(METRIC_IDS.flatMap((metric) => candidatesFor({ ...context, metric }).map((c) => c.dimension)));
    for (const dimension of Object.keys(DIMENSION_CHOICES)) expect(dimensions).toContain(dimension);
    const forAlpha = candidatesFor({ ...context, metric: 'alpha' });
    expect(forAlpha.filter((c) => c.dimension === 'annualization').map((c) => c.value)).toEqual([52, 250, 252, 260, 365]);
    expect(forAlpha.filter((c) => c.dimension === 'window_end').map((c) => c.value)).toEqual([-1, -2, -3]);
    expect(forAlpha.filter((c) => c.dimension === 'benchmark').map((c) => c.value)).toEqual(['BMK-B']);
    expect(forAlpha.filter((c) => c.dimension === 'scale').map((c) => c.value)).toEqual(['percent']);
    expect(forAlpha.filter((c) => c.dimension === 'alpha_form').map((c) => c.value)).toContain('compounded');
    // A fixed annual MAR is tried for the figures a MAR enters, besides zero.
    const forSortino = candidatesFor({ ...context, metric: 'sortino' });
    expect(forSortino.filter((c) => c.dimension === 'mar').map((c) => c.value)).toEqual(['zero', 0.02, 0.03, 0.05]);
  });

  it('never try the configured value, and skip dimensions that cannot change the metric', () => {
    for (const metric of METRIC_IDS) {
      for (const candidate of candidatesFor({ ...context, metric })) {
        expect((DEFAULT_METHODOLOGY as unknown as Record<string, unknown>)[candidate.dimension]).not.toBe(candidate.value);
      }
    }
    // docs/methodology.md: max_drawdown uses no benchmark and no rate; the frequency matters only under `drawdown: sampled`.
    expect(new Set(candidatesFor({ ...context, metric: 'max_drawdown' }).map((c) => c.dimension))).toEqual(new Set(['scale', 'window_end', 'drawdown', 'frequency']));
    // docs/methodology.md: the ratio scale changes the four ratios only, the rate's conversion only figures the rate enters.
    expect(affects('ratio_scale', 'std_dev')).toBe(false);
    expect(affects('ratio_scale', 'sortino')).toBe(true);
    expect(affects('rate_conversion', 'tracking_error')).toBe(false);
    expect(affects('rate_conversion', 'sharpe')).toBe(true);
    expect(affects('mar', 'beta')).toBe(false);
    expect(affects('a_dimension_added_later', 'beta')).toBe(true);
  });
});
