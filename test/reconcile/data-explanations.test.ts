import { describe, expect, it } from 'vitest';
import { BusinessCalendars } from '../../src/calendar/business-calendar.js';
import { epochDay } from '../../src/calendar/days.js';
import { runChecks } from '../../src/checks/run.js';
import { computeMetrics, type MetricInputs } from '../../src/metrics/compute.js';
import { DEFAULT_METHODOLOGY } from '../../src/metrics/methodology.js';
import { reconcile } from '../../src/reconcile/reconcile.js';
import { markSuspectFigures } from '../../src/reconcile/suspect-data.js';
import { frameFromSeries } from '../../src/series/frame.js';
import { AS_OF, figureUnder, universe, vendorRow } from './universe.js';

/**
 * A data fault planted inside a window: the vendor computed its figure on clean data, navassay
 * gets the faulty feed. The checks find the fault; reconciliation must name the finding's key and
 * say whether repairing the suspect values reproduces the vendor's figure.
 */
const { days, navs, data } = universe();

function withNavs(changed: Record<string, number[]>): MetricInputs {
  const all = { ...navs, ...changed };
  return { ...data, nav: frameFromSeries(Object.entries(all).map(([id, values]) => ({ id, dates: days, values }))) };
}

function findingsOn(inputs: MetricInputs) {
  return runChecks({ nav: inputs.nav, benchmarks: inputs.benchmarks, master: inputs.master, rejected: [], calendars: new BusinessCalendars(), asOf: AS_OF });
}

describe('a data fault inside the window', () => {
  // FUND-B's NAV is quoted ×10 from 2026-06-15 on (a change of quoting unit nobody announced).
  const jump = days.indexOf(epochDay(2026, 6, 15));
  const faulty = withNavs({ 'FUND-B': navs['FUND-B'].map((v, k) => (k >= jump ? v * 10 : v)) });
  const findings = findingsOn(faulty);
  const split = findings.find((f) => f.check === 'split_like_jump' && f.series_id === 'FUND-B');

  it('the checks find the unannounced jump as an error', () => {
    expect(split).toBeDefined();
    expect(split!.severity).toBe('error');
  });

  it('the data explanation names the finding and the repaired data reproduces the vendor figure', () => {
    const rows = (['std_dev', 'sharpe', 'beta'] as const).map((metric) => vendorRow('FUND-B', '1y', metric, figureUnder(data, 'FUND-B', '1y', metric).toFixed(4)));
    const { results, summary } = reconcile({ vendor: rows, data: faulty, findings }, { methodology: DEFAULT_METHODOLOGY });
    for (const result of results) {
      expect(result.status).toBe('breach');
      expect(result.suspect_data).toContain(split!.key);
      const explanation = result.explanations.find((e) => e.kind === 'data' && e.finding.key === split!.key);
      expect(explanation).toMatchObject({ kind: 'data', reproduces: true, finding: { check: 'split_like_jump' } });
    }
    expect(summary.breaches.explained_by_data).toBe(3);
  });

  it('a figure whose window holds the fault carries the key in the metrics answer too; other series do not', () => {
    const answer = markSuspectFigures(
      computeMetrics({ ...faulty, asOf: AS_OF, windows: ['1y', '3y'], methodology: DEFAULT_METHODOLOGY }),
      findings,
      faulty.master,
    );
    const fundB = answer.metrics.filter((row) => row.series_id === 'FUND-B');
    expect(fundB.every((row) => row.suspect_data?.includes(split!.key))).toBe(true);
    const fundA = answer.metrics.filter((row) => row.series_id === 'FUND-A');
    expect(fundA.every((row) => !row.suspect_data?.includes(split!.key))).toBe(true);
  });

  it('a spike on a month-end is named, and the answer says whether its repair reproduces the figure', () => {
    const spikeDay = days.indexOf(epochDay(2026, 8, 31));
    const spiked = withNavs({ 'FUND-C': navs['FUND-C'].map((v, k) => (k === spikeDay ? v * 1.3 : v)) });
    const spikeFindings = findingsOn(spiked);
    const spike = spikeFindings.find((f) => f.check === 'spike_reversal' && f.series_id === 'FUND-C');
    expect(spike).toBeDefined();
    const row = vendorRow('FUND-C', '1y', 'std_dev', figureUnder(data, 'FUND-C', '1y', 'std_dev').toFixed(4));
    const [result] = reconcile({ vendor: [row], data: spiked, findings: spikeFindings }, { methodology: DEFAULT_METHODOLOGY }).results;
    expect(result.status).toBe('breach');
    const explanation = result.explanations.find((e) => e.kind === 'data' && e.finding.key === spike!.key);
    expect(explanation).toBeDefined();
    if (explanation?.kind !== 'data') throw new Error('not a data explanation');
    expect(explanation.repair).toMatch(/geometric mean/);
    // The repaired month-end lies within a day's move of the clean one, so the figure comes back close.
    expect(Math.abs(explanation.computed! - figureUnder(data, 'FUND-C', '1y', 'std_dev'))).toBeLessThan(0.01);
  });
});
