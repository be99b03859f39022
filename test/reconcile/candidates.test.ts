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
  });

  it('never try the configured value, and skip dimensions that cannot change the metric', () => {
    for (const metric of METRIC_IDS) {
      for (const candidate of candidatesFor({ ...context, metric })) {
        expect((DEFAULT_METHODOLOGY as unknown as Record<string, unknown>)[candidate.dimension]).not.toBe(candidate.value);
      }
    }
    // docs/methodology.md: max_drawdown uses every NAV observation whatever the frequency, and no benchmark.
    expect(new Set(candidatesFor({ ...context, metric: 'max_drawdown' }).map((c) => c.dimension))).toEqual(new Set(['scale', 'window_end']));
    expect(affects('mar', 'beta')).toBe(false);
    expect(affects('a_dimension_added_later', 'beta')).toBe(true);
  });
});
