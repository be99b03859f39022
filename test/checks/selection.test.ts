/**
 * `bracketedMedian` must give exactly the median the quickselect gives (speed never changes
 * answers), or undefined and leave it to the quickselect: same number, same sign of zero.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bracketedMedian, medianInPlace } from '../../src/checks/selection.js';

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
