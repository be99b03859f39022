import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { vendorInconsistent } from '../../checks/vendor-inconsistent.js';
import { BusinessCalendars } from '../../src/calendar/business-calendar.js';
import { parseIsoDate } from '../../src/calendar/days.js';
import type { FeedContext } from '../../src/checks/check.js';
import type { VendorFigureRecord } from '../../src/ingest/records.js';
import type { MetricId } from '../../src/ingest/schema.js';
import { frameFromSeries } from '../../src/series/frame.js';

const AS_OF = parseIsoDate('2026-11-30')!;
let line = 2;
const figure = (series_id: string, metric: MetricId, value: number, unit: 'decimal' | 'percent' = 'decimal', window = '3y'): VendorFigureRecord => ({
  series_id,
  as_of: AS_OF,
  window,
  metric,
  value: unit === 'percent' ? value / 100 : value,
  unit,
  raw_value: String(value),
  line: line++,
});

const context = (vendor: VendorFigureRecord[]): FeedContext => ({
  asOf: AS_OF,
  calendars: new BusinessCalendars(),
  nav: frameFromSeries([]),
  benchmarks: undefined,
  master: undefined,
  previous: undefined,
  rejected: [],
  vendor,
});

const run = (vendor: VendorFigureRecord[]) => vendorInconsistent.run(context(vendor), vendorInconsistent.defaults);

describe('vendor_inconsistent', () => {
  it('passes a coherent set of figures', () => {
    expect(
      run([
        figure('NVA0001', 'std_dev', 0.1412),
        figure('NVA0001', 'r_squared', 0.93),
        figure('NVA0001', 'max_drawdown', 0.21),
        figure('NVA0001', 'sharpe', 0.55),
        figure('NVA0001', 'beta', 0.97),
        figure('NVA0001', 'treynor', 0.06),
        figure('NVA0002', 'r_squared', 93, 'percent'),
      ]),
    ).toEqual([]);
  });

  it('reports values no such figure can take, and says when a decimal looks like a percentage', () => {
    const findings = run([figure('NVA0001', 'std_dev', -0.02), figure('NVA0001', 'r_squared', 93), figure('NVA0001', 'max_drawdown', 140)]);
    expect(findings.map((f) => [f.severity, f.series_id, f.start, f.key])).toEqual([
      ['error', 'NVA0001', '2026-11-30', 'vendor_inconsistent|NVA0001|2026-11-30|3y|std_dev|impossible'],
      ['error', 'NVA0001', '2026-11-30', 'vendor_inconsistent|NVA0001|2026-11-30|3y|r_squared|impossible'],
      ['error', 'NVA0001', '2026-11-30', 'vendor_inconsistent|NVA0001|2026-11-30|3y|max_drawdown|impossible'],
    ]);
    // An R² of 93 with unit decimal is 93 times too large; read as 93 % it would be fine.
    expect(findings[1].message).toContain('it looks like a percentage written without unit percent');
    // A drawdown of 140 is impossible either way (140 % is still beyond 100 %), so no such hint.
    expect(findings[2].message).not.toContain('percentage');
  });

  it('reports the same figure delivered twice with different values, once', () => {
    const findings = run([figure('NVA0003', 'beta', 0.98), figure('NVA0003', 'beta', 1.02), figure('NVA0003', 'alpha', 0.01), figure('NVA0003', 'alpha', 0.01)]);
    expect(findings).toHaveLength(1);
    expect(findings[0].message).toBe('The vendor sent 2 different values for the 3y beta of NVA0003 as of 2026-11-30 (0.98, 1.02); only one can be published.');
  });

  it("flags a Treynor ratio whose sign is not Sharpe's times beta's, and only when both are clearly nonzero", () => {
    // Definition: Sharpe and Treynor divide the same mean excess return, by a deviation (> 0) and by beta.
    const contradictory = run([figure('NVA0004', 'sharpe', 0.8), figure('NVA0004', 'beta', 1.1), figure('NVA0004', 'treynor', -0.05)]);
    expect(contradictory.map((f) => [f.severity, f.key])).toEqual([['warning', 'vendor_inconsistent|NVA0004|2026-11-30|3y|treynor|sign']]);
    const negativeBeta = run([figure('NVA0005', 'sharpe', 0.8), figure('NVA0005', 'beta', -0.6), figure('NVA0005', 'treynor', -0.05)]);
    expect(negativeBeta).toEqual([]);
    const nearZero = run([figure('NVA0006', 'sharpe', 0.03), figure('NVA0006', 'beta', 1.1), figure('NVA0006', 'treynor', -0.001)]);
    expect(nearZero).toEqual([]);
  });
});

describe('vendor_inconsistent, conflicting copies', () => {
  it('reports exactly the groups whose values a Set keeps apart (NaN equal to NaN, 0 to −0)', () => {
    const value = fc.constantFrom(0.1, 0.2, 0, -0, NaN, 1e-9);
    const copy = fc.record({ series: fc.constantFrom('NVA0001', 'NVA0002'), window: fc.constantFrom('1y', '3y'), value });
    fc.assert(
      fc.property(fc.array(copy, { maxLength: 12 }), (copies) => {
        const figures = copies.map((c) => figure(c.series, 'std_dev', c.value, 'decimal', c.window));
        const groups = new Map<string, number[]>();
        for (const f of figures) groups.set(`${f.series_id}|${f.window}`, [...(groups.get(`${f.series_id}|${f.window}`) ?? []), f.value]);
        const expected = [...groups.entries()].filter(([, values]) => new Set(values).size > 1).map(([key]) => key);
        const found = run(figures)
          .filter((finding) => finding.key.endsWith('conflict'))
          .map((finding) => `${finding.series_id}|${(finding.evidence.figures as Array<{ window: string }>)[0].window}`);
        expect(found).toEqual(expected);
      }),
    );
  });
});

/**
 * The check's grouping as first written, one string key per figure: the plain form the grouped
 * scan (by series, as-of and window, without a key per figure) must match finding for finding.
 */
function plainConflictsAndSigns(figures: readonly VendorFigureRecord[], minRatio: number): string[] {
  const byKey = new Map<string, VendorFigureRecord[]>();
  for (const f of figures) {
    const key = [f.series_id, f.as_of, f.window, f.metric].join('|');
    byKey.set(key, [...(byKey.get(key) ?? []), f]);
  }
  const conflicts = [...byKey.values()].filter((copies) => new Set(copies.map((c) => c.value)).size > 1).map((copies) => `conflict ${copies.map((c) => c.line).join(',')}`);
  const groups = new Map<string, Map<string, VendorFigureRecord>>();
  for (const f of figures) {
    const key = [f.series_id, f.as_of, f.window].join('|');
    const group = groups.get(key) ?? new Map<string, VendorFigureRecord>();
    if (!group.has(f.metric)) group.set(f.metric, f);
    groups.set(key, group);
  }
  const signs: string[] = [];
  for (const group of groups.values()) {
    const [sharpe, beta, treynor] = [group.get('sharpe'), group.get('beta'), group.get('treynor')];
    if (!sharpe || !beta || !treynor || Math.abs(sharpe.value) < minRatio || Math.abs(beta.value) < minRatio || treynor.value === 0) continue;
    if (Math.sign(treynor.value) !== Math.sign(sharpe.value) * Math.sign(beta.value)) signs.push(`sign ${treynor.line},${sharpe.line},${beta.line}`);
  }
  return [...conflicts, ...signs];
}

describe('vendor_inconsistent, grouped scan', () => {
  it('finds the same conflicts and contradicting signs, in the same order, as one key per figure', () => {
    const record = fc.record({
      series: fc.constantFrom('NVA0001', 'NVA0002', 'NVA0003'),
      asOf: fc.constantFrom(AS_OF, AS_OF - 31),
      window: fc.constantFrom('1y', '3y'),
      metric: fc.constantFrom<MetricId>('sharpe', 'beta', 'treynor', 'alpha'),
      value: fc.constantFrom(0.5, -0.5, 0.05, 0, -0, NaN, 1.2),
    });
    // Short files, and long ones whose groups pass the size searched pair by pair.
    const files = fc.oneof(fc.array(record, { maxLength: 60 }), fc.array(record, { minLength: 80, maxLength: 240 }));
    fc.assert(
      fc.property(files, (records) => {
        const figures = records.map((r, i): VendorFigureRecord => ({ series_id: r.series, as_of: r.asOf, window: r.window, metric: r.metric, value: r.value, unit: 'decimal', raw_value: String(r.value), line: i + 2 }));
        const found = run(figures)
          .filter((f) => !f.key.endsWith('impossible'))
          .map((f) => {
            const evidence = f.evidence as { figures?: Array<{ line: number }>; treynor?: { line: number }; sharpe?: { line: number }; beta?: { line: number } };
            return evidence.figures ? `conflict ${evidence.figures.map((c) => c.line).join(',')}` : `sign ${evidence.treynor!.line},${evidence.sharpe!.line},${evidence.beta!.line}`;
          });
        expect(found).toEqual(plainConflictsAndSigns(figures, vendorInconsistent.defaults.min_ratio_for_sign));
      }),
      { numRuns: 2000 },
    );
  });
});
