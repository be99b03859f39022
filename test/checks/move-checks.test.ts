import { describe, expect, it } from 'vitest';
import { splitLikeJump } from '../../checks/split-like-jump.js';
import { spikeReversal } from '../../checks/spike-reversal.js';
import { returnOutlier } from '../../checks/return-outlier.js';
import { dateShift } from '../../checks/date-shift.js';
import { runChecks } from '../../src/checks/run.js';
import { action, day, frameOfArrays, iso, linked, trackingPair } from './helpers.js';

const AT = 150;

function scaledFrom(values: number[], at: number, factor: number): number[] {
  return values.map((v, i) => (i >= at ? Math.round(v * factor * 1e6) / 1e6 : v));
}

describe('split_like_jump', () => {
  const { dates, fund, bench } = trackingPair(11);
  const halved = scaledFrom(fund, AT, 0.5);

  it('flags an unannounced halving that persists and the benchmark did not make', () => {
    const { series, context } = linked(dates, halved, bench);
    const findings = splitLikeJump.run(series, context, splitLikeJump.defaults);
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({
      check: 'split_like_jump',
      severity: 'error',
      series_id: 'F1',
      start: iso(dates[AT]),
      end: iso(dates[AT]),
      key: `split_like_jump|F1|${iso(dates[AT])}`,
      evidence: { nearest_simple_ratio: 0.5, previous: { date: iso(dates[AT - 1]), line: AT + 1 }, current: { line: AT + 2 } },
    });
  });

  it('keeps an announced split as info, with the action as evidence', () => {
    const { series, context } = linked(dates, halved, bench, { actions: [action('F1', iso(dates[AT]), 'split', 2)] });
    const [finding] = splitLikeJump.run(series, context, splitLikeJump.defaults);
    expect(finding.severity).toBe('info');
    expect(finding.evidence.corporate_actions).toEqual([{ kind: 'split', ex_date: iso(dates[AT]), value: 2, line: 2 }]);
    expect(finding.message).toContain('explained by the announced split of 2 new units per old unit');
  });

  it('leaves a jump that reverses the next day to spike_reversal', () => {
    const typo = fund.map((v, i) => (i === AT ? v * 10 : v));
    const { series, context } = linked(dates, typo, bench);
    expect(splitLikeJump.run(series, context, splitLikeJump.defaults)).toEqual([]);
    expect(spikeReversal.run(series, context, spikeReversal.defaults).map((f) => f.start)).toEqual([iso(dates[AT])]);
  });

  it('does not flag a jump the benchmark made too', () => {
    const { series, context } = linked(dates, halved, scaledFrom(bench, AT, 0.5));
    expect(splitLikeJump.run(series, context, splitLikeJump.defaults)).toEqual([]);
  });
});

describe('spike_reversal', () => {
  const { dates, fund, bench } = trackingPair(12);

  it('flags a one-day 8 % keying error that is undone the next day', () => {
    const spiked = fund.map((v, i) => (i === AT ? Math.round(v * 1.08 * 1e4) / 1e4 : v));
    const { series, context } = linked(dates, spiked, bench);
    const findings = spikeReversal.run(series, context, spikeReversal.defaults);
    expect(findings.map((f) => [f.start, f.end, f.severity, f.key])).toEqual([[iso(dates[AT]), iso(dates[AT]), 'error', `spike_reversal|F1|${iso(dates[AT])}`]]);
    expect(findings[0].evidence).toMatchObject({ spike: { value: spiked[AT], line: AT + 2 }, after: { value: fund[AT + 1] } });
    expect(returnOutlier.run(series, context, returnOutlier.defaults)).toEqual([]);
  });

  it('ignores ordinary days and moves smaller than 1 %', () => {
    const nudged = fund.map((v, i) => (i === AT ? v * 1.004 : v));
    const { series, context } = linked(dates, nudged, bench);
    expect(spikeReversal.run(series, context, spikeReversal.defaults)).toEqual([]);
  });
});

describe('return_outlier', () => {
  const { dates, fund, bench } = trackingPair(13);

  it('flags a lasting 9 % move the benchmark did not make', () => {
    const { series, context } = linked(dates, scaledFrom(fund, AT, 1.09), bench);
    const findings = returnOutlier.run(series, context, returnOutlier.defaults);
    expect(findings.map((f) => [f.start, f.severity, f.key])).toEqual([[iso(dates[AT]), 'warning', `return_outlier|F1|${iso(dates[AT])}`]]);
    expect(findings[0].evidence.robust_z as number).toBeGreaterThan(50);
    expect(findings[0].evidence.beta as number).toBeCloseTo(1, 1);
  });

  it('does not flag a clean tracking fund, nor a big market day it follows', () => {
    const { series, context } = linked(dates, fund, bench);
    expect(returnOutlier.run(series, context, returnOutlier.defaults)).toEqual([]);
    const crash = (values: number[]) => scaledFrom(values, AT, 0.92);
    const shocked = linked(dates, crash(fund), crash(bench));
    expect(returnOutlier.run(shocked.series, shocked.context, returnOutlier.defaults)).toEqual([]);
  });
});

describe('date_shift', () => {
  const { dates, fund, bench } = trackingPair(14, 320);
  const SHIFT_FROM = 190;
  const late = fund.map((v, i) => (i >= SHIFT_FROM ? fund[i - 1] : v));

  it('finds values stamped one business day late, with the lag and where it starts', () => {
    const { series, context } = linked(dates, late, bench);
    const findings = dateShift.run(series, context, dateShift.defaults);
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({
      severity: 'error',
      end: iso(dates[dates.length - 1]),
      evidence: { stamped_late_by_business_days: 1, benchmark_id: 'BM1' },
    });
    // The switch is placed where the lagged fit starts winning; on days the benchmark barely
    // moves both fits are equal, so the estimate may trail the true switch by a few days.
    const start = dates.indexOf(day(findings[0].start!));
    expect(start - SHIFT_FROM).toBeGreaterThanOrEqual(0);
    expect(start - SHIFT_FROM).toBeLessThanOrEqual(3);
    expect(findings[0].key).toBe(`date_shift|F1|1|${findings[0].start}`);
  });

  it('finds nothing on a well-dated fund, and the shifted days raise no outliers or spikes', () => {
    const clean = linked(dates, fund, bench);
    expect(dateShift.run(clean.series, clean.context, dateShift.defaults)).toEqual([]);
    const shifted = linked(dates, late, bench);
    expect(returnOutlier.run(shifted.series, shifted.context, returnOutlier.defaults)).toEqual([]);
    expect(spikeReversal.run(shifted.series, shifted.context, spikeReversal.defaults)).toEqual([]);
  });
});

describe('spike_reversal: two adjacent digits swapped', () => {
  // An index-like fund at a NAV near 10, printed to 4 decimals, 0.02 % daily noise: swapping
  // the first two decimals (10.1234 → 10.2134) moves it by under 1 % (below the size floor of
  // an ordinary spike) but by dozens of its robust standard deviations.
  const pair = trackingPair(31, 300, 0.0002);
  const fund = pair.fund.map((v) => Math.round(v * 1000) / 10000);
  const at = fund.findIndex((v, i) => i >= 120 && Math.abs(Number(v.toFixed(4)[3]) - Number(v.toFixed(4)[4])) === 1 && v.toFixed(4).length === 7);
  const text = fund[at].toFixed(4);
  const typed = text.slice(0, 3) + text[4] + text[3] + text.slice(5);
  const keyed = fund.map((v, i) => (i === at ? Number(typed) : v));

  it('reports the day as a spike and names the swap with the value meant', () => {
    expect(at).toBeGreaterThan(0);
    expect(Math.abs(Math.log(Number(typed) / fund[at]))).toBeLessThan(0.01);
    const { series, context } = linked(pair.dates, keyed, pair.bench);
    const findings = spikeReversal.run(series, context, spikeReversal.defaults);
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ start: iso(pair.dates[at]), evidence: { likely_cause: 'swapped_digits', likely_intended: Number(text) } });
    expect(findings[0].message).toContain(`NAV of ${typed} on ${iso(pair.dates[at])} looks like ${text} with two adjacent digits swapped`);
    expect(returnOutlier.run(series, context, returnOutlier.defaults)).toEqual([]);
  });

  it('finds nothing on the same fund without the swap', () => {
    const { series, context } = linked(pair.dates, fund, pair.bench);
    expect(spikeReversal.run(series, context, spikeReversal.defaults)).toEqual([]);
  });
});

describe('date_shift: a recent change of lag, against a constant lag since inception', () => {
  // 320 business days of a fund tracking its benchmark with 0.1 % daily noise: its daily
  // returns are independent from day to day, so a lagged fit and the fit as stamped cannot
  // both be good; the recent shift covers only the last 50 or 60 days (under a calendar quarter).
  const { dates, fund, bench } = trackingPair(21, 320);
  const stampedLate = (from: number, lag: number) => fund.map((v, i) => (i >= from ? fund[i - lag] : v));

  it.each([[270, 1], [260, 2]])('finds the last days from row %i stamped %i business day(s) late, as one shift with its span', (from, lag) => {
    const { series, context } = linked(dates, stampedLate(from, lag), bench);
    const findings = dateShift.run(series, context, dateShift.defaults);
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ end: iso(dates[dates.length - 1]), evidence: { stamped_late_by_business_days: lag } });
    const start = dates.indexOf(day(findings[0].start!));
    expect(start - from).toBeGreaterThanOrEqual(0);
    expect(start - from).toBeLessThanOrEqual(3);
    expect(findings[0].evidence.correlation_at_lag).toBeGreaterThan(0.8); // the switch day itself fits neither lag
    expect(findings[0].evidence.correlation_as_stamped).toBeLessThan(0.3);
  });

  it('reports the recent shift alone: no keying-error spikes or outliers inside it', () => {
    const { series, context } = linked(dates, stampedLate(270, 1), bench);
    expect(spikeReversal.run(series, context, spikeReversal.defaults)).toEqual([]);
    expect(returnOutlier.run(series, context, returnOutlier.defaults)).toEqual([]);
  });

  it('raises no alarm on a fund valued a day behind its benchmark since its first day: one information finding names the constant lag', () => {
    const { series, context } = linked(dates, stampedLate(1, 1), bench);
    const findings = dateShift.run(series, context, dateShift.defaults);
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ severity: 'info', end: iso(dates[dates.length - 1]), evidence: { lag_business_days: 1 }, key: 'date_shift|F1|constant|1' });
    expect(findings[0].message).toContain('most likely the fund is valued at a different point');
  });
});

describe('a date-shifted span silences spikes by the run’s own date_shift settings', () => {
  const { dates, fund, bench } = trackingPair(14, 320);
  const SHIFT_FROM = 190;
  const SPIKE_AT = 260;
  // Stamped a day late from SHIFT_FROM on, with a 6 % keying error inside the shifted span.
  const late = fund.map((v, i) => (i >= SHIFT_FROM ? fund[i - 1] : v)).map((v, i) => (i === SPIKE_AT ? Math.round(v * 1.06 * 1e4) / 1e4 : v));
  const feed = (settings: object) => {
    const { series, context } = linked(dates, late, bench);
    const nav = frameOfArrays([{ id: series.id, dates, values: late }]);
    return runChecks({ nav, benchmarks: context.benchmarks, master: [context.master!], rejected: [], calendars: context.calendars, asOf: context.asOf }, settings)
      .filter((f) => f.check === 'date_shift' || f.check === 'spike_reversal' || f.check === 'return_outlier')
      .map((f) => f.check);
  };

  it('with date_shift on, one date_shift finding says why, and the spike inside its span is left to it', () => {
    expect(feed({})).toEqual(['date_shift']);
  });

  it('with date_shift off, nothing claims the span, so the keying error is reported', () => {
    expect(feed({ run: { date_shift: { enabled: false } } })).toContain('spike_reversal');
  });

  it('with date_shift tuned to demand a correlation no quarter reaches, the span is not claimed either', () => {
    expect(feed({ run: { date_shift: { min_correlation: 1.01 } } })).toContain('spike_reversal');
  });
});
