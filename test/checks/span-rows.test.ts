/**
 * Speed never changes answers: benchmark_mismatch reads every benchmark's move over a fund's
 * week from one remembered row per span (`spansMoves`). Each entry must be the move the plain
 * lookup gives (first rows of both days, both levels positive), NaN where a benchmark lacks a
 * day, on the first ask and on every later ask of the same span.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { FrameTables, spansMoves } from '../../src/checks/series-tables.js';
import { indexOfSorted } from '../../src/numeric/search.js';
import { seriesAt } from '../../src/series/frame.js';
import { frameOfArrays } from './helpers.js';

function plainMove(dates: Int32Array, values: Float64Array, start: number, end: number): number {
  const p = indexOfSorted(dates, start);
  const q = indexOfSorted(dates, end);
  return p >= 0 && q > p && values[p] > 0 && values[q] > 0 ? Math.log(values[q] / values[p]) : NaN;
}

describe('the benchmarks\' moves over a span, remembered per span', () => {
  it('equal the plain lookup for every benchmark, asked once or again', () => {
    const level = fc.oneof(fc.double({ min: 1, max: 5000, noNaN: true }), fc.constant(0), fc.constant(-1));
    const benchmark = fc.array(fc.tuple(fc.integer({ min: 0, max: 3 }), level), { minLength: 0, maxLength: 60 });
    fc.assert(
      fc.property(fc.array(benchmark, { minLength: 1, maxLength: 5 }), fc.array(fc.tuple(fc.integer({ min: 20000, max: 20150 }), fc.integer({ min: 0, max: 90 })), { minLength: 1, maxLength: 30 }), (series, spans) => {
        // Gaps of 0–3 days between rows (0: a date on two rows).
        const frame = frameOfArrays(series.map((rows, s) => {
          let day = 20000;
          const dates = rows.map(([gap]) => (day += gap));
          return { id: `B${s}`, dates, values: rows.map(([, value]) => value) };
        }));
        const tables = new FrameTables(frame);
        for (const [start, length] of [...spans, ...spans]) {
          const row = spansMoves(tables, start, start + length);
          for (let s = 0; s < frame.ids.length; s++) {
            const { dates, values } = seriesAt(frame, s);
            expect(row[s]).toBe(plainMove(dates, values, start, start + length));
          }
        }
      }),
      { numRuns: 200 },
    );
  });
});
