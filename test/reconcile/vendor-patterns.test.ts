import { describe, expect, it } from 'vitest';
import { DEFAULT_METHODOLOGY } from '../../src/metrics/methodology.js';
import { reconcile } from '../../src/reconcile/reconcile.js';
import { sharedCauseFirst, vendorPatterns } from '../../src/reconcile/vendor-patterns.js';
import { figureUnder, universe, vendorRow } from './universe.js';

const convention = (changes: Record<string, unknown>) => ({ kind: 'convention', changes });

describe('vendor-level explanations', () => {
  it('say once which change reproduces most breaches of a metric, with the count', () => {
    const breaches = [
      { metric: 'std_dev', explanations: [convention({ sd_denominator: 'population' })] },
      { metric: 'std_dev', explanations: [convention({ window_end: -1 }), convention({ sd_denominator: 'population' })] },
      { metric: 'std_dev', explanations: [] },
      { metric: 'beta', explanations: [convention({ benchmark: 'B2' })] },
    ];
    const patterns = vendorPatterns(breaches);
    expect(patterns).toEqual([
      {
        metric: 'std_dev',
        changes: { sd_denominator: 'population' },
        explained: 2,
        breaches: 3,
        sentence: "This vendor's std_dev figures are reproduced with sd_denominator population: 2 of 3 breaches explained.",
      },
    ]);
    // The shared cause goes first where a breach has it; a breach without it keeps its order.
    expect(sharedCauseFirst('std_dev', breaches[1].explanations, patterns)[0]).toEqual(convention({ sd_denominator: 'population' }));
    expect(sharedCauseFirst('beta', breaches[3].explanations, patterns)).toEqual(breaches[3].explanations);
  });

  it('reconcile reports the pattern of a vendor using population deviations throughout', () => {
    const { data } = universe();
    const rows = ['FUND-A', 'FUND-B', 'FUND-C'].flatMap((id) =>
      ['1y', '3y'].map((window) => vendorRow(id, window, 'std_dev', figureUnder(data, id, window, 'std_dev', { sd_denominator: 'population' }).toFixed(4))),
    );
    const { summary } = reconcile({ vendor: rows, data, findings: [] }, { methodology: DEFAULT_METHODOLOGY });
    expect(summary.by_status.breach).toBe(6);
    expect(summary.vendor_patterns[0]).toMatchObject({ metric: 'std_dev', changes: { sd_denominator: 'population' }, explained: 6, breaches: 6 });
  });
});
