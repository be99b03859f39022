/**
 * Speed never changes answers: benchmark_mismatch finds the fund's last weeks from the end of its
 * steps (`lastWeeklyReturns`) and every benchmark's suffix R² in one array per fund
 * (`everyBenchmarkFits`). Each must give, bit for bit, what the plain forms they replace give:
 * every week summed from the first step, then the last weeks kept; every benchmark's moves by
 * plain lookup, then its running sums from the end.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { everyBenchmarkFits, lastWeeklyReturns, type Week } from '../../checks/benchmark-mismatch.js';
import { isoWeekStart } from '../../src/calendar/days.js';
import { GROSS_Z, type ResidualMoves } from '../../src/checks/residual-moves.js';
import { FrameTables } from '../../src/checks/series-tables.js';
import { indexOfSorted } from '../../src/numeric/search.js';
import { seriesAt, type SeriesSlice } from '../../src/series/frame.js';
import { frameOfArrays } from './helpers.js';

/**
 * Numbers in [min, max] with full mantissas, spread evenly: fc.double spreads over exponents
 * instead (most of its draws are nearly zero), and sums of such draws round too rarely to tell
 * one order of additions from another.
 */
const spread = (min: number, max: number) => fc.integer({ min: 0, max: 1_000_000 }).map((i) => min + ((max - min) * i) / 1_000_003);

/** The weekly returns as benchmark_mismatch summed them before (checks/benchmark-mismatch.ts at 321f46d), every week from the first step. */
function plainWeeklyReturns(series: SeriesSlice, returns: ResidualMoves): Week[] {
  const weeks: Week[] = [];
  let currentWeek = NaN;
  let gross = false;
  for (let k = 0; k < returns.count; k++) {
    const end = series.dates[returns.to[k]];
    const week = isoWeekStart(end);
    if (week !== currentWeek) {
      if (gross) weeks.pop();
      weeks.push({ start: series.dates[returns.from[k]], end, fund: 0 });
      currentWeek = week;
      gross = false;
    }
    const current = weeks[weeks.length - 1];
    current.end = end;
    current.fund += returns.fund[k];
    if (Math.abs(returns.z[k]) >= GROSS_Z && Math.abs(returns.residual[k]) > 0.05) gross = true;
  }
  if (gross) weeks.pop();
  return weeks;
}

/** The benchmark's move over exactly the week's two days (first rows, both levels positive), as `weekMove` defines it. */
function plainMove(dates: Int32Array, values: Float64Array, start: number, end: number): number {
  const p = indexOfSorted(dates, start);
  const q = indexOfSorted(dates, end);
  return p >= 0 && q > p && values[p] > 0 && values[q] > 0 ? Math.log(values[q] / values[p]) : NaN;
}

/** R² from every start to the end by running sums from the end, as `suffixFits` computed it before (NaN where fewer than minWeeks weeks price). */
function plainSuffixFits(weeks: Week[], moves: number[], minWeeks: number): number[] {
  const fits: number[] = new Array(weeks.length).fill(NaN);
  let n = 0, sx = 0, sy = 0, sxx = 0, syy = 0, sxy = 0;
  for (let i = weeks.length - 1; i >= 0; i--) {
    const y = moves[i];
    if (Number.isFinite(y)) {
      const x = weeks[i].fund;
      n++;
      sx += x;
      sy += y;
      sxx += x * x;
      syy += y * y;
      sxy += x * y;
    }
    if (n < minWeeks) continue;
    const cxy = sxy - (sx * sy) / n;
    const cxx = sxx - (sx * sx) / n;
    const cyy = syy - (sy * sy) / n;
    fits[i] = cxx > 0 && cyy > 0 ? (cxy * cxy) / (cxx * cyy) : NaN;
  }
  return fits;
}

describe('the fund\'s last weeks, found from the end', () => {
  it('are the plain weekly returns\' last weeks, sums and dates bit for bit', () => {
    // Steps of 1–3 rows between anchors, rows 0–2 days apart (weeks of up to seven steps); some steps gross (|z| ≥ 8 with a residual beyond 0.05).
    const step = fc.record({
      rows: fc.integer({ min: 1, max: 3 }),
      fund: spread(-0.2, 0.2),
      z: fc.oneof(spread(-4, 4), fc.constantFrom(-9, 8, 12)),
      residual: fc.constantFrom(0.01, -0.02, 0.06, -0.3),
    });
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 2 }), { minLength: 2, maxLength: 400 }), fc.array(step, { maxLength: 200 }), fc.integer({ min: 0, max: 60 }), (gaps, steps, count) => {
        let day = 20000;
        const dates = gaps.map((gap) => (day += gap));
        const series = seriesAt(frameOfArrays([{ id: 'F', dates, values: dates.map(() => 100) }]), 0);
        const from: number[] = [], to: number[] = [];
        let row = 0;
        for (const s of steps) {
          if (row + s.rows >= dates.length) break;
          from.push(row);
          to.push((row += s.rows));
        }
        const used = steps.slice(0, from.length);
        const returns = {
          count: from.length,
          from: Int32Array.from(from),
          to: Int32Array.from(to),
          fund: Float64Array.from(used, (s) => s.fund),
          z: Float64Array.from(used, (s) => s.z),
          residual: Float64Array.from(used, (s) => s.residual),
        } as unknown as ResidualMoves;
        const plain = count === 0 ? [] : plainWeeklyReturns(series, returns).slice(-count);
        expect(lastWeeklyReturns(series, returns, count)).toEqual(plain);
      }),
      { numRuns: 500 },
    );
  });
});

describe('every benchmark\'s suffix R² in one array', () => {
  it('equals the plain lookup and sums for every benchmark and judged quarter', () => {
    // Mostly positive levels on most days, so most weeks price and most judged starts have a fit.
    const level = fc.oneof({ weight: 20, arbitrary: spread(1, 5000) }, { weight: 1, arbitrary: fc.constantFrom(0, -1) });
    const benchmark = fc.oneof({ weight: 1, arbitrary: fc.constant([] as Array<[number, number]>) }, { weight: 6, arbitrary: fc.array(fc.tuple(fc.oneof({ weight: 8, arbitrary: fc.constant(1) }, { weight: 1, arbitrary: fc.constantFrom(0, 2, 3) }), level), { minLength: 100, maxLength: 160 }) });
    const week = fc.tuple(fc.integer({ min: 20001, max: 20090 }), fc.integer({ min: 1, max: 9 }), spread(-0.1, 0.1));
    fc.assert(
      fc.property(fc.array(benchmark, { minLength: 1, maxLength: 5 }), fc.array(week, { maxLength: 60 }), fc.integer({ min: 0, max: 8 }), (series, rawWeeks, minWeeks) => {
        const frame = frameOfArrays(series.map((rows, s) => {
          let day = 20000;
          const dates = rows.map(([gap]) => (day += gap));
          return { id: `B${s}`, dates, values: rows.map(([, value]) => value) };
        }));
        const weeks: Week[] = rawWeeks.map(([start, length, fund]) => ({ start, end: start + length, fund }));
        const fits = everyBenchmarkFits(weeks, new FrameTables(frame), minWeeks);
        expect(fits.quarters).toBe(Math.ceil(weeks.length / 13));
        for (let b = 0; b < frame.ids.length; b++) {
          const { dates, values } = seriesAt(frame, b);
          const plain = plainSuffixFits(weeks, weeks.map((w) => plainMove(dates, values, w.start, w.end)), minWeeks);
          for (let q = 0; q < fits.quarters; q++) expect(Object.is(fits.r2[b * fits.quarters + q], plain[13 * q])).toBe(true);
        }
      }),
      { numRuns: 300 },
    );
  });
});
