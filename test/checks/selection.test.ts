/**
 * `bracketedMedian` must give exactly the median the quickselect gives (speed never changes
 * answers), or undefined and leave it to the quickselect: same number, same sign of zero.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { median as referenceMedian } from 'simple-statistics';
import { bracketedMedian, medianInPlace, medianOfWork, sortAscending, topRanks } from '../../src/checks/selection.js';

const plainMedian = (values: ArrayLike<number>) => medianInPlace(Float64Array.from(values));
const agrees = (values: ArrayLike<number>) => {
  const bracketed = bracketedMedian(values);
  return bracketed === undefined || Object.is(bracketed, plainMedian(values));
};

describe('bracketedMedian', () => {
  it('gives the quickselect median of long arrays, odd and even, with ties, zeros and infinities', () => {
    // Few distinct values so that ties (and ±0 at the middle) are common, or any doubles.
    const few = fc.constantFrom(0, -0, 1e-300, 0.5, -0.5, 1, Infinity, -Infinity);
    const value = fc.oneof(few, fc.double({ noNaN: true }), fc.double({ min: -0.05, max: 0.05, noNaN: true }));
    fc.assert(
      fc.property(fc.array(value, { minLength: 500, maxLength: 1500 }), (values) => {
        expect(agrees(values)).toBe(true);
        expect(agrees(Float64Array.from(values))).toBe(true);
      }),
      { numRuns: 300 },
    );
  });

  it('answers for most arrays of ordinary moves, and leaves the values as they were', () => {
    let seed = 7;
    const random = () => (seed = (seed * 16807) % 2147483647) / 2147483647;
    let answered = 0;
    for (let trial = 0; trial < 200; trial++) {
      const values = Float64Array.from({ length: 2000 + trial }, () => (random() + random() + random() - 1.5) * 0.01);
      const copy = values.slice();
      const bracketed = bracketedMedian(values);
      expect(values).toEqual(copy);
      if (bracketed === undefined) continue;
      answered++;
      expect(Object.is(bracketed, plainMedian(values))).toBe(true);
    }
    expect(answered).toBeGreaterThan(190);
  });

  it('leaves zeros, NaN and short arrays to the quickselect', () => {
    expect(bracketedMedian(new Float64Array(1000))).toBeUndefined();
    expect(bracketedMedian(Float64Array.from({ length: 1000 }, (_, i) => (i === 3 ? NaN : i)))).toBeUndefined();
    expect(bracketedMedian(Float64Array.from({ length: 100 }, (_, i) => i))).toBeUndefined();
    expect(bracketedMedian(Float64Array.from({ length: 1000 }, (_, i) => i + 1))).toBe(500.5);
  });
});

// endOnFailure: shrinking an array of a thousand doubles takes minutes; the first counterexample says enough.
describe('medianOfWork', () => {
  it('gives the quickselect median whichever way it goes: short arrays, zeros at the middle, long arrays', () => {
    const value = fc.oneof(fc.constantFrom(0, -0, 0.25, -0.25), fc.double({ min: -0.05, max: 0.05, noNaN: true }));
    fc.assert(
      // Arrays of 512 values and more try the bracket first; shorter ones go straight to the quickselect.
      fc.property(fc.oneof(fc.array(value, { minLength: 1, maxLength: 600 }), fc.array(value, { minLength: 512, maxLength: 1500 })), (values) => {
        expect(Object.is(medianOfWork(Float64Array.from(values)), plainMedian(values))).toBe(true);
      }),
      { numRuns: 300, endOnFailure: true },
    );
  });

  it('agrees with an independent median (simple-statistics) on finite values', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 400, maxLength: 1200 }), (values) => {
        expect(medianOfWork(Float64Array.from(values))).toBeCloseTo(referenceMedian(values), 9);
      }),
      { numRuns: 200, endOnFailure: true },
    );
  });
});

/** The plain form `topRanks` replaces: a full sort by value, then ranks `from` on. */
const plainTopRanks = (values: ArrayLike<number>, from: number) => Array.from(values).sort((a, b) => a - b).slice(from);

describe('topRanks', () => {
  // Magnitudes: finite, not negative, with many ties (a value repeated, or zeros) or any size.
  const magnitude = fc.oneof(fc.constantFrom(0, 0.5, 1, 2.5, 8), fc.double({ min: 0, max: 1e6, noNaN: true, noDefaultInfinity: true }), fc.double({ min: 0, max: 3, noNaN: true }));
  const magnitudes = fc.array(magnitude.map((x) => Math.abs(x)), { minLength: 0, maxLength: 1500 });

  it('gives the sorted values of ranks from … n − 1, as a full sort does, for any from', () => {
    fc.assert(
      fc.property(magnitudes, fc.double({ min: 0, max: 1, noNaN: true }), (values, share) => {
        const from = Math.min(values.length, Math.floor(share * values.length));
        expect(Array.from(topRanks(Float64Array.from(values), from))).toEqual(plainTopRanks(values, from));
      }),
      { numRuns: 400 },
    );
  });

  it('gives the top 5 % (and 3 more) of long arrays of |z| as a full sort does', () => {
    let seed = 11;
    const random = () => (seed = (seed * 16807) % 2147483647) / 2147483647;
    for (let trial = 0; trial < 100; trial++) {
      const n = 500 + 37 * trial;
      // Fat-tailed magnitudes: a ratio of uniforms, some rounded so that ties occur.
      const values = Float64Array.from({ length: n }, (_, i) => {
        const x = Math.abs((random() - 0.5) / (random() + 0.05));
        return i % 5 === 0 ? Math.round(x * 10) / 10 : x;
      });
      const from = Math.max(0, n - Math.floor(0.05 * n) - 3);
      const expected = plainTopRanks(values, from);
      expect(Array.from(topRanks(values, from))).toEqual(expected);
    }
  });

  it('answers when the bound misses: a sample of the smallest values falls back to the plain selection', () => {
    // Evenly spaced sample positions hold the largest values, so the bound is far too high.
    const n = 1024;
    const values = Float64Array.from({ length: n }, (_, i) => (i % 8 === 0 ? 1000 + i : i / 8));
    const from = 100;
    expect(Array.from(topRanks(values.slice(), from))).toEqual(plainTopRanks(values, from));
    expect(topRanks(new Float64Array(0), 0)).toEqual(new Float64Array(0));
  });
});

describe('sortAscending', () => {
  it('orders finite values without −0 exactly as the typed array sort does', () => {
    const value = fc.oneof(fc.constantFrom(0, 1, -1, 2.5), fc.double({ noNaN: true, noDefaultInfinity: true }).filter((x) => !Object.is(x, -0)));
    fc.assert(
      fc.property(fc.array(value, { maxLength: 600 }), (values) => {
        expect(Array.from(sortAscending(Float64Array.from(values)))).toEqual(Array.from(Float64Array.from(values).sort()));
      }),
      { numRuns: 400 },
    );
  });
});
