/**
 * The checks' shortcuts give exactly what the plain computation gives (speed never changes
 * answers): the least-squares fit that skips a second pass keeping the same steps, the
 * benchmark moves remembered in the frame tables, and the medians and robust scales that work
 * in reused arrays. Each is compared bit for bit with a plain version written here.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { fitAgainstBenchmark, GROSS_Z, type Fit } from '../../src/checks/residual-moves.js';
import { FrameTables, indexInFrame, spanLogMove } from '../../src/checks/series-tables.js';
import { median, robustScale } from '../../src/checks/support.js';
import { frameFromSeries, seriesAt } from '../../src/series/frame.js';

/** The median by sorting a copy: the textbook definition. */
function sortedMedian(values: ArrayLike<number>): number {
  const sorted = Array.from(values).sort((a, b) => a - b);
  const n = sorted.length;
  if (n === 0) return NaN;
  return n % 2 === 1 ? sorted[n >> 1] : (sorted[(n >> 1) - 1] + sorted[n >> 1]) / 2;
}

function plainRobustScale(values: ArrayLike<number>, centre = sortedMedian(values)): number {
  return 1.4826 * sortedMedian(Array.from(values, (x) => Math.abs(x - centre)));
}

/**
 * Two passes of least squares of fund on benchmark moves, always both: the first over every
 * step with a benchmark move, the second without the steps more than GROSS_Z robust standard
 * deviations (per √span) off the first line; the scale is the robust scale of the per-day
 * residuals, floored at 1e-7.
 */
function plainFit(fund: Float64Array, bench: Float64Array, span: Float64Array): Fit {
  let fit: Fit = { intercept: 0, beta: 1, scale: Infinity };
  for (let pass = 0; pass < 2; pass++) {
    let n = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
    for (let k = 0; k < fund.length; k++) {
      const x = bench[k];
      const y = fund[k];
      if (!Number.isFinite(x)) continue;
      if (Math.abs(y - fit.intercept * span[k] - fit.beta * x) > GROSS_Z * fit.scale * Math.sqrt(span[k])) continue;
      n++;
      sx += x;
      sy += y;
      sxx += x * x;
      sxy += x * y;
    }
    const varX = sxx - (sx * sx) / n;
    const beta = n >= 3 && varX > 0 ? (sxy - (sx * sy) / n) / varX : fit.beta;
    const intercept = n >= 3 ? (sy - beta * sx) / n : 0;
    const perDay: number[] = [];
    for (let k = 0; k < fund.length; k++) if (Number.isFinite(bench[k])) perDay.push((fund[k] - intercept * span[k] - beta * bench[k]) / Math.sqrt(span[k]));
    const scale = plainRobustScale(perDay);
    fit = { intercept, beta, scale: Number.isFinite(scale) && scale > 1e-7 ? scale : 1e-7 };
  }
  return fit;
}

const move = fc.double({ min: -0.05, max: 0.05, noNaN: true });
/** A step: the fund's move, the benchmark's (sometimes missing), the span, and now and then a gross error. */
const step = fc.record({
  bench: fc.oneof({ weight: 9, arbitrary: move }, { weight: 1, arbitrary: fc.constant(NaN) }),
  noise: move,
  span: fc.constantFrom(1, 1, 1, 2, 3, 4),
  gross: fc.oneof({ weight: 30, arbitrary: fc.constant(0) }, { weight: 1, arbitrary: fc.constantFrom(Math.LN2, -Math.LN2, 0.3) }),
});

describe('check shortcuts', () => {
  it('fitAgainstBenchmark gives the plain two-pass fit, with and without gross steps', () => {
    fc.assert(
      fc.property(fc.array(step, { minLength: 0, maxLength: 700 }), fc.double({ min: -2, max: 2, noNaN: true }), (steps, beta) => {
        const bench = Float64Array.from(steps, (s) => s.bench);
        const fund = Float64Array.from(steps, (s) => (Number.isFinite(s.bench) ? beta * s.bench : 0) + s.noise / 5 + s.gross);
        const span = Float64Array.from(steps, (s) => s.span);
        const fit = fitAgainstBenchmark(fund, bench, span);
        const plain = plainFit(fund, bench, span);
        expect(Object.is(fit.intercept, plain.intercept)).toBe(true);
        expect(Object.is(fit.beta, plain.beta)).toBe(true);
        expect(Object.is(fit.scale, plain.scale)).toBe(true);
      }),
      { numRuns: 300 },
    );
  });

  it('spanLogMove gives ln(values[q] / values[p]) whatever was asked before', () => {
    const levels = fc.array(fc.double({ min: 1, max: 1e4, noNaN: true }), { minLength: 2, maxLength: 40 });
    fc.assert(
      fc.property(levels, levels, fc.array(fc.tuple(fc.nat(), fc.nat(), fc.boolean())), (first, second, asks) => {
        const frame = frameFromSeries([
          { id: 'A', dates: first.map((_, i) => 20000 + i), values: first },
          { id: 'B', dates: second.map((_, i) => 20000 + i), values: second },
        ]);
        const tables = new FrameTables(frame);
        for (const [a, b, inSecond] of asks) {
          const values = inSecond ? second : first;
          const p = a % (values.length - 1);
          const q = p + 1 + (b % (values.length - 1 - p));
          expect(Object.is(spanLogMove(tables, inSecond ? 1 : 0, p, q), Math.log(values[q] / values[p]))).toBe(true);
        }
      }),
      { numRuns: 300 },
    );
  });

  it('indexInFrame finds a series of the frame by its views, and no copy or other stretch of rows', () => {
    const frame = frameFromSeries([
      { id: 'A', dates: [20000, 20001, 20002], values: [1, 2, 3] },
      { id: 'B', dates: [20000, 20001], values: [4, 5] },
      { id: 'C', dates: [20005], values: [6] },
    ]);
    for (let i = 0; i < 3; i++) expect(indexInFrame(frame, seriesAt(frame, i))).toBe(i);
    const b = seriesAt(frame, 1);
    expect(indexInFrame(frame, { ...b, dates: b.dates.slice(), values: b.values })).toBe(-1);
    expect(indexInFrame(frame, { ...b, values: b.values.slice() })).toBe(-1);
    // The right id over another series' rows, or over fewer rows, is not that series.
    expect(indexInFrame(frame, { ...seriesAt(frame, 0), id: 'B' })).toBe(-1);
    expect(indexInFrame(frame, { ...b, dates: frame.dates.subarray(3, 4), values: frame.values.subarray(3, 4) })).toBe(-1);
    expect(indexInFrame(undefined, b)).toBe(-1);
  });

  it('median and robustScale in reused arrays give the plain numbers, call after call, short and long', () => {
    const value = fc.oneof(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.double({ min: -0.05, max: 0.05, noNaN: true }), fc.constantFrom(0, 0.01, -0.01));
    fc.assert(
      fc.property(fc.array(fc.array(value, { maxLength: 1200 }), { minLength: 1, maxLength: 4 }), (arrays) => {
        for (const values of arrays) {
          const typed = Float64Array.from(values);
          const copy = typed.slice();
          const m = median(typed);
          // ±0 at the middle may come out either way (see selection.ts): compared as numbers there.
          if (m === 0) expect(sortedMedian(values) === 0).toBe(true);
          else expect(Object.is(m, sortedMedian(values))).toBe(true);
          expect(Object.is(robustScale(typed, 0), plainRobustScale(values, 0))).toBe(true);
          expect(typed).toEqual(copy);
        }
      }),
      { numRuns: 200 },
    );
  });
});
