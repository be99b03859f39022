import { describe, expect, it } from 'vitest';
import { METRIC_IDS } from '../../src/metrics/kernels.js';
import { DEFAULT_METHODOLOGY } from '../../src/metrics/methodology.js';
import { halfUnitOfPrinted, printedDecimals } from '../../src/reconcile/precision.js';
import { reconcile } from '../../src/reconcile/reconcile.js';
import { judge, severityOf } from '../../src/reconcile/status.js';
import { DEFAULT_TOLERANCES, ToleranceResolver, ToleranceSettingsSchema } from '../../src/reconcile/tolerances.js';
import { figureUnder, universe, vendorRow } from './universe.js';

const { data } = universe();

describe('honest rounding never breaches', () => {
  const PRINTS = [
    { print: '2 decimals', text: (v: number) => v.toFixed(2), unit: 'decimal' as const },
    { print: '3 decimals', text: (v: number) => v.toFixed(3), unit: 'decimal' as const },
    { print: '4 decimals', text: (v: number) => v.toFixed(4), unit: 'decimal' as const },
    { print: 'percent, 2 decimals', text: (v: number) => (v * 100).toFixed(2), unit: 'percent' as const },
    { print: 'percent, 1 decimal', text: (v: number) => (v * 100).toFixed(1), unit: 'percent' as const },
  ];
  it.each(PRINTS)('every metric, window and fund printed to $print', ({ text, unit }) => {
    const rows = ['FUND-A', 'FUND-B', 'FUND-C'].flatMap((id) =>
      ['1y', '3y', '5y'].flatMap((window) => METRIC_IDS.map((metric) => vendorRow(id, window, metric, text(figureUnder(data, id, window, metric)), unit))),
    );
    const { results, summary } = reconcile({ vendor: rows, data, findings: [] }, { methodology: DEFAULT_METHODOLOGY });
    expect(results).toHaveLength(3 * 3 * 12);
    expect(summary.by_status.breach).toBe(0);
    expect(summary.by_status.not_computable).toBe(0);
  });
});

describe('statuses', () => {
  it('a figure outside tolerance but within the printed half unit is rounding, beyond it a breach', () => {
    // Tolerance 0.0001; a vendor printing 0.12 (two decimals) may be off by 0.005.
    expect(judge(0.12, 0.1249, 0.0001, 0.005).status).toBe('rounding');
    expect(judge(0.12, 0.1251, 0.0001, 0.005).status).toBe('breach');
    expect(judge(0.1412, 0.14115, 0.0001, 0.00005).status).toBe('match');
    expect(judge(0.1412, 0.1398, 0.0005, 0.00005)).toEqual({ status: 'breach', difference: 0.1412 - 0.1398 });
  });

  it('a breach is an error for --fail-on; a figure the data cannot support a warning', () => {
    expect(severityOf('breach', false)).toBe('error');
    expect(severityOf('not_computable', true)).toBe('warning');
    expect(severityOf('not_computable', false)).toBe('info');
    expect(severityOf('rounding', false)).toBe('info');
  });

  it('not_computable gives the reason and whether the vendor published a figure the data cannot support', () => {
    const noRates = { ...data, rates: undefined };
    const rows = [vendorRow('FUND-A', '10y', 'std_dev', '0.1500'), vendorRow('FUND-A', '3y', 'sharpe', '0.55'), vendorRow('FUND-Z', '1y', 'std_dev', '0.1')];
    const { results, summary } = reconcile({ vendor: rows, data: noRates, findings: [] }, { methodology: DEFAULT_METHODOLOGY });
    expect(results.map((r) => r.status)).toEqual(['not_computable', 'not_computable', 'not_computable']);
    expect(results[0]).toMatchObject({ unsupported_by_data: true, severity: 'warning' });
    expect(results[0].reason).toMatch(/history too short/);
    expect(results[1]).toMatchObject({ unsupported_by_data: false, severity: 'info' });
    expect(results[1].reason).toMatch(/no risk-free rates were given/);
    expect(results[2]).toMatchObject({ unsupported_by_data: true });
    expect(summary.unsupported_by_data).toBe(2);
  });

  it('an as-of keeps only the vendor figures of that day', () => {
    const row = vendorRow('FUND-A', '1y', 'std_dev', '0.1');
    const { results, summary } = reconcile({ vendor: [row], data, findings: [] }, { methodology: DEFAULT_METHODOLOGY, asOf: row.as_of - 30 });
    expect(results).toEqual([]);
    expect(summary.skipped).toBe(1);
  });
});

describe('printed precision', () => {
  it.each([
    ['0.1412', 'decimal', 0.00005],
    ['14.12', 'percent', 0.00005],
    ['14.1%', 'decimal', 0.0005],
    ['0.97', 'decimal', 0.005],
    ['1', 'decimal', 0.5],
    ['12,34', 'decimal', 0.005],
    ['1.2e-3', 'decimal', 0.00005],
  ] as const)('%s (%s) is good to ±%d', (raw_value, unit, half) => {
    expect(halfUnitOfPrinted({ raw_value, unit })).toBeCloseTo(half, 15);
  });
  it('counts decimals after a point or a comma, less an exponent', () => {
    expect(printedDecimals('-0.001')).toBe(3);
    expect(printedDecimals('5e2')).toBe(-2);
  });
});

describe('tolerances', () => {
  it('defaults cover every metric: a basis point for returns and risks, a thousandth for beta, R² and ratios', () => {
    expect(Object.keys(DEFAULT_TOLERANCES).sort()).toEqual([...METRIC_IDS].sort());
    expect(DEFAULT_TOLERANCES.std_dev).toEqual({ absolute: 0.0001, relative: 0 });
    expect(DEFAULT_TOLERANCES.sharpe).toEqual({ absolute: 0.001, relative: 0 });
  });

  it('run, then category, then series overrides, like the checks settings', () => {
    const settings = ToleranceSettingsSchema.parse({
      run: { beta: { absolute: 0.002 } },
      categories: { 'Money Market': { beta: { relative: 0.01 } } },
      series: { S1: { beta: { absolute: 0.05 } } },
    });
    const resolver = new ToleranceResolver(settings);
    expect(resolver.resolve('beta', null, 'S0')).toEqual({ absolute: 0.002, relative: 0 });
    expect(resolver.resolve('beta', 'money market', 'S0')).toEqual({ absolute: 0.002, relative: 0.01 });
    expect(resolver.resolve('beta', 'money market', 'S1')).toEqual({ absolute: 0.05, relative: 0.01 });
    expect(resolver.resolve('std_dev', 'money market', 'S1')).toEqual(DEFAULT_TOLERANCES.std_dev);
  });

  it('refuses an unknown metric or a negative tolerance', () => {
    expect(ToleranceSettingsSchema.safeParse({ run: { betta: { absolute: 0.1 } } }).success).toBe(false);
    expect(ToleranceSettingsSchema.safeParse({ run: { beta: { absolute: -0.1 } } }).success).toBe(false);
  });

  it('a wider series tolerance turns a breach into a match', () => {
    const value = figureUnder(data, 'FUND-A', '3y', 'beta');
    const row = vendorRow('FUND-A', '3y', 'beta', (value + 0.004).toFixed(4));
    const run = (tolerances = {}) => reconcile({ vendor: [row], data, findings: [] }, { methodology: DEFAULT_METHODOLOGY, tolerances }).results[0];
    expect(run().status).toBe('breach');
    expect(run({ series: { 'FUND-A': { beta: { absolute: 0.005 } } } }).status).toBe('match');
  });
});
