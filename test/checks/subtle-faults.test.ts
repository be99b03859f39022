/**
 * The subtle kinds of fault (issue "the subtle faults a careful team still misses"), planted by
 * both generators with `subtle: true` on seeds no other test uses, scored with the same rules
 * as the other recall and precision tests (`fixtures/universe/score.ts`). Asserted here are the
 * classes the checks now handle: unannounced splits of a few units for a few (3:2, 2:3, 4:3,
 * 3:4, 5:4, 4:5), which must be named as split-like jumps and not as outliers, the lost
 * inception day, brief repeats on 2-decimal funds on days the benchmark implied several ticks
 * of move, and 1.5–3 % keying errors on volatile funds reversed the next day; and, on series
 * built here, the honest look-alikes that must stay quiet. The other subtle kinds (recent date
 * shifts, sibling benchmarks) are measured by `bench/score-checks.ts --subtle`; what still
 * slips through is listed in docs/checks.md.
 */
import { describe, expect, it } from 'vitest';
import { staleValue } from '../../checks/stale-value.js';
import { spikeReversal } from '../../checks/spike-reversal.js';
import { SeededRandom as Random } from '../../src/random.js';
import { iso, linked, weekdays } from './helpers.js';
import { generateUniverse } from '../../fixtures/universe/generate.js';
import { generateAltUniverse } from '../../fixtures/universe-alt/generate.js';
import { poolScores, scoreTable } from '../../fixtures/universe/score.js';
import { runChecks } from '../../src/checks/run.js';
import type { PlantedFault } from '../../fixtures/universe/generate.js';
import type { Finding } from '../../src/findings.js';

const runs: Array<{ universe: { faults: PlantedFault[] }; findings: Finding[] }> = [
  ...[707, 808].map((seed) => generateUniverse({ seed, subtle: true })),
  ...[77, 88].map((seed) => generateAltUniverse({ seed, subtle: true })),
].map((universe) => ({ universe, findings: runChecks(universe) }));

describe('subtle faults on both generators (seeds 707, 808 and alternative 77, 88)', () => {
  const pooled = poolScores(runs);
  console.table(scoreTable(pooled));

  // stale_value's precision bar is the floor for a class (0.85), not 0.95: alternative
  // seed 77 holds three chance runs the checks still report, two on a 2-decimal fund rescaled
  // by an unannounced 2-for-3 split (64.5333: a grid of 0.00667 the tick estimate does not see)
  // and one at the as-of (see docs/checks.md, subtle faults, what still slips through).
  it.each([
    ['split_like_jump', 0.95],
    ['missing_dates', 0.95],
    ['stale_value', 0.85],
    ['spike_reversal', 0.95],
  ])('%s finds at least 95 % of its planted faults, at least %s of its alarms real', (id, precision) => {
    const score = pooled.get(id as string)!;
    expect(score.planted).toBeGreaterThanOrEqual(20);
    expect(score.found / score.planted, `${id} recall`).toBeGreaterThanOrEqual(0.95);
    expect(score.real / score.findings, `${id} precision`).toBeGreaterThanOrEqual(precision as number);
  });

  it('names an unannounced 3-for-2 or 5-for-4 split as a split, never as a return outlier', () => {
    let fractional = 0;
    for (const { universe, findings } of runs) {
      for (const fault of universe.faults.filter((f) => f.check === 'split_like_jump' && /split, NAV ×|-for-/.test(f.description))) {
        fractional++;
        const onThatDay = findings.filter((f) => f.series_id === fault.series_id && f.start === fault.start);
        expect(onThatDay.map((f) => f.check), `${fault.series_id} ${fault.start} ${fault.description}`).not.toContain('return_outlier');
      }
    }
    expect(fractional).toBeGreaterThanOrEqual(16);
  });

  it('reports a lost inception day as missing, citing the master’s inception date', () => {
    for (const { universe, findings } of runs) {
      for (const fault of universe.faults.filter((f) => /inception|launch/.test(f.description))) {
        const finding = findings.find((f) => f.check === 'missing_dates' && f.series_id === fault.series_id && f.start === fault.start);
        expect(finding?.evidence.inception, `${fault.series_id} ${fault.start}`).toBe(fault.start);
      }
    }
  });

  it('finds the brief repeats on 2-decimal funds, single unchanged prices included', () => {
    let planted = 0, found = 0;
    for (const { universe, findings } of runs) {
      for (const fault of universe.faults.filter((f) => f.check === 'stale_value' && /2-decimal/.test(f.description))) {
        planted++;
        if (findings.some((f) => f.check === 'stale_value' && f.series_id === fault.series_id && f.start! <= fault.end! && fault.start! <= f.end!)) found++;
      }
    }
    expect(planted).toBeGreaterThanOrEqual(6);
    expect(found / planted).toBeGreaterThanOrEqual(0.9);
  });

  it('names a 1.5–3 % reversal on a volatile fund as a spike, not as a return outlier', () => {
    let planted = 0, found = 0;
    for (const { universe, findings } of runs) {
      for (const fault of universe.faults.filter((f) => f.check === 'spike_reversal' && /volatile fund/.test(f.description))) {
        planted++;
        const onThatDay = findings.filter((f) => f.series_id === fault.series_id && f.start === fault.start);
        if (onThatDay.some((f) => f.check === 'spike_reversal')) found++;
        expect(onThatDay.map((f) => f.check), `${fault.series_id} ${fault.start} ${fault.description}`).not.toContain('return_outlier');
      }
    }
    expect(planted).toBeGreaterThanOrEqual(10);
    expect(found / planted).toBeGreaterThanOrEqual(0.9);
  });
});

/**
 * A 2-decimal bond fund following its index with beta 1 and its own noise of `noise` a day, on
 * an index moving `indexVol` a day (normal, seeded); NAVs rounded to `decimals`.
 */
function bondFund(seed: number, level: number, indexVol: number, noise: number, decimals = 2, count = 400) {
  const random = new Random(seed);
  const dates = weekdays('2025-01-06', count);
  const bench: number[] = [];
  const exact: number[] = [];
  let b = 1000, f = level;
  for (let i = 0; i < count; i++) {
    if (i > 0) {
      const r = indexVol * random.normal();
      b *= Math.exp(r);
      f *= Math.exp(r + noise * random.normal());
    }
    bench.push(Math.round(b * 1e4) / 1e4);
    exact.push(f);
  }
  const round = (v: number) => Math.round(v * 10 ** decimals) / 10 ** decimals;
  return { dates, bench, exact, fund: exact.map(round), round };
}

/** Index of the first step after `from` whose index move is at least `move` in size. */
function dayIndexMoved(bench: number[], from: number, move: number): number {
  for (let i = from; i < bench.length - 1; i++) if (Math.abs(Math.log(bench[i] / bench[i - 1])) >= move) return i;
  throw new Error('no such day');
}

describe('brief repeats judged by the ticks the benchmark implied (stale_value)', () => {
  it('reports one unchanged 2-decimal price on a day the index implied about 10 ticks, the fund itself moving about one tick of its own', () => {
    // A quiet bond fund at 15: its own noise 0.05 % is 0.75 cents; a 1 % index day is 15 cents.
    const { dates, bench, fund } = bondFund(1, 15, 0.004, 0.0005);
    const at = dayIndexMoved(bench, 200, 0.01);
    fund[at] = fund[at - 1];
    const { series, context } = linked(dates, fund, bench);
    const findings = staleValue.run(series, context, staleValue.defaults);
    const finding = findings.find((f) => f.start === iso(dates[at - 1]) && f.end === iso(dates[at]));
    expect(finding?.evidence.business_days).toBe(2);
  });

  it('stays quiet on the same repeat on a fund printed to 4 decimals (a single repeat there is judged only within a run)', () => {
    const { dates, bench, exact, round } = bondFund(1, 15, 0.004, 0.0005, 4);
    const fund = exact.map(round);
    const at = dayIndexMoved(bench, 200, 0.01);
    fund[at] = fund[at - 1];
    const { series, context } = linked(dates, fund, bench);
    expect(staleValue.run(series, context, staleValue.defaults)).toEqual([]);
  });

  it('stays quiet on an honest 2-decimal bond fund at 22.47 repeating over nine days while its index moved +0.02 % in total', () => {
    // A short-duration index moving 0.03 % a day, a fund whose own noise is 0.01 %: 22.47 moves
    // about a cent a day and repeats on many days by rounding alone (issue 14's false alarm).
    const { dates, bench, exact, round } = bondFund(3, 22.47, 0.0003, 0.0001);
    const start = 250;
    // Nine quiet days: the index creeps +0.02 % in all, the fund's price rounds to the same cent.
    for (let i = start; i < start + 9; i++) bench[i] = Math.round(bench[start - 1] * (1 + (0.0002 * (i - start + 1)) / 9) * 1e4) / 1e4;
    const fund = exact.map(round);
    for (let i = start - 1; i < start + 9; i++) fund[i] = 22.47;
    const { series, context } = linked(dates, fund, bench);
    const findings = staleValue.run(series, context, staleValue.defaults);
    expect(findings.filter((f) => f.start! <= iso(dates[start + 8]) && iso(dates[start - 1]) <= f.end!)).toEqual([]);
  });
});

describe('reversals on volatile funds and funds valued a day behind (spike_reversal)', () => {
  /** An active fund with beta 1 on an index moving 1 % a day, its own noise 0.4 % a day (normal). */
  function volatileFund(seed: number, lagged = false) {
    const random = new Random(seed);
    const count = 500;
    const dates = weekdays('2024-01-01', count);
    const moves = Array.from({ length: count }, (_, i) => (i === 0 ? 0 : 0.01 * random.normal()));
    const bench: number[] = [];
    const fund: number[] = [];
    let b = 1000, f = 100;
    for (let i = 0; i < count; i++) {
      b *= Math.exp(moves[i]);
      f *= Math.exp((lagged ? (i > 0 ? moves[i - 1] : 0) : moves[i]) + (i > 0 ? 0.004 * random.normal() : 0));
      bench.push(Math.round(b * 100) / 100);
      fund.push(Math.round(f * 1e4) / 1e4);
    }
    return { dates, bench, fund };
  }

  it('reports a 2.8 % keying error reversed the next day on a fund whose own noise is 0.4 % a day (7 times it)', () => {
    const { dates, bench, fund } = volatileFund(5);
    fund[300] = Math.round(fund[300] * Math.exp(0.028) * 1e4) / 1e4;
    const { series, context } = linked(dates, fund, bench);
    const findings = spikeReversal.run(series, context, spikeReversal.defaults);
    expect(findings.map((f) => f.start)).toContain(iso(dates[300]));
  });

  it('stays quiet on a fund valued a day behind its index when the index crashes 8 % and rebounds 6 % the next day', () => {
    const { dates, bench, fund } = volatileFund(6, true);
    // The crash reaches the lagging fund's NAV one business day after the index.
    const crash = 350;
    const scale = (from: number, factor: number, values: number[], decimals: number) => {
      for (let i = from; i < values.length; i++) values[i] = Math.round(values[i] * factor * 10 ** decimals) / 10 ** decimals;
    };
    scale(crash, Math.exp(-0.083), bench, 2);
    scale(crash + 1, Math.exp(0.06), bench, 2);
    scale(crash + 1, Math.exp(-0.083), fund, 4);
    scale(crash + 2, Math.exp(0.06), fund, 4);
    const { series, context } = linked(dates, fund, bench);
    expect(context.moves?.constantLag?.lag, 'the lag the whole history shows').toBe(-1);
    expect(spikeReversal.run(series, context, spikeReversal.defaults)).toEqual([]);
  });
});
