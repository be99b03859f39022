import fc from 'fast-check';
import { sampleCorrelation } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { correlation } from '../../src/numeric/correlation.js';
import { firstAbove, firstAtOrAbove, indexOfSorted } from '../../src/numeric/search.js';

/** Oracles: a linear scan (the definition of each search) and simple-statistics' sample correlation. */
const sortedInts = fc.array(fc.integer({ min: -50, max: 50 }), { maxLength: 60 }).map((values) => Int32Array.from(values.sort((a, b) => a - b)));

describe('binary search', () => {
  it('agrees with a linear scan on every range of every sorted array, duplicates included', () => {
    fc.assert(
      fc.property(sortedInts, fc.integer({ min: -55, max: 55 }), fc.nat(), fc.nat(), (sorted, x, a, b) => {
        const start = Math.min(a, b) % (sorted.length + 1);
        const end = Math.max(start, Math.max(a, b) % (sorted.length + 1));
        const scan = (test: (v: number) => boolean) => {
          for (let i = start; i < end; i++) if (test(sorted[i])) return i;
          return end;
        };
        expect(firstAbove(sorted, x, start, end)).toBe(scan((v) => v > x));
        expect(firstAtOrAbove(sorted, x, start, end)).toBe(scan((v) => v >= x));
        expect(indexOfSorted(sorted, x)).toBe(Array.from(sorted).indexOf(x));
      }),
    );
  });

  it('handles the empty array and the ends', () => {
    const empty = new Int32Array(0);
    expect([firstAbove(empty, 1), firstAtOrAbove(empty, 1), indexOfSorted(empty, 1)]).toEqual([0, 0, -1]);
    const days = Int32Array.of(10, 20, 20, 30);
    expect([firstAbove(days, 5), firstAbove(days, 20), firstAbove(days, 30)]).toEqual([0, 3, 4]);
    expect([firstAtOrAbove(days, 20), indexOfSorted(days, 20), indexOfSorted(days, 25)]).toEqual([1, 1, -1]);
  });
});

describe('correlation', () => {
  const pairs = fc
    // Thousandths, so the spread stays well above the rounding step of values near 1e7.
    .array(fc.tuple(fc.integer({ min: -1000, max: 1000 }), fc.integer({ min: -1000, max: 1000 })).map(([a, b]) => [a / 1000, b / 1000] as const), { minLength: 3, maxLength: 80 })
    .filter((rows) => new Set(rows.map((r) => r[0])).size > 2 && new Set(rows.map((r) => r[1])).size > 2);

  it('equals simple-statistics sampleCorrelation, also for values far from zero (levels, not returns)', () => {
    fc.assert(
      fc.property(pairs, fc.constantFrom(0, 1e3, 1e7), (rows, offset) => {
        const x = rows.map((r) => offset + r[0]);
        const y = rows.map((r) => offset + r[1]);
        const ours = correlation(x, y);
        const oracle = sampleCorrelation(x, y);
        if (Number.isFinite(oracle)) expect(Math.abs(ours - oracle)).toBeLessThan(1e-6);
      }),
    );
  });

  it('keeps its digits where the one-pass sums lose them', () => {
    // y = 2x exactly, on levels near 1e8: the correlation is 1 by definition.
    const x = [1e8 + 0.1, 1e8 + 0.2, 1e8 + 0.4, 1e8 + 0.3, 1e8 + 0.5];
    const y = x.map((v) => 2 * (v - 1e8) + 5e7);
    expect(correlation(x, y)).toBeCloseTo(1, 9);
    expect(correlation([1, 1, 1], [1, 2, 3])).toBeNaN(); // no spread
    expect(correlation([1], [2])).toBeNaN(); // fewer than two pairs
    // A published worked example: Anscombe's quartet, set I, r = 0.816 (Anscombe 1973, Table 1 statistics).
    const ax = [10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5];
    const ay = [8.04, 6.95, 7.58, 8.81, 8.33, 9.96, 7.24, 4.26, 10.84, 4.82, 5.68];
    expect(correlation(ax, ay)).toBeCloseTo(0.816, 3);
  });
});
