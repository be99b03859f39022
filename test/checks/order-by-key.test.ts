/**
 * `orderByKey` must give exactly the order the plain comparator sort gives (speed never
 * changes answers): the oracle is `Array.prototype.sort`, stable since ES2019 (ECMA-262,
 * "Array.prototype.sort": elements that compare equal keep their original order).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { orderByKey } from '../../src/checks/support.js';

const plainOrder = (indices: number[], keys: Float64Array) => Int32Array.from([...indices].sort((a, b) => keys[a] - keys[b]));

describe('orderByKey', () => {
  it('orders indices as the stable comparator sort does, ties (and ±0) in the given order', () => {
    // Few distinct keys so that ties are common; subsets of indices as stale_value passes them.
    const key = fc.oneof(fc.constantFrom(0, -0, 0.5, 1, 1e-300), fc.double({ min: 0, max: 1, noNaN: true }));
    fc.assert(
      fc.property(fc.array(key, { maxLength: 300 }), fc.array(fc.boolean(), { maxLength: 300 }), (values, keep) => {
        const keys = Float64Array.from(values);
        const indices = values.map((_, i) => i).filter((i) => keep[i] ?? true);
        expect(orderByKey(indices, keys)).toEqual(plainOrder(indices, keys));
      }),
    );
  });

  it('keeps the plain order when some key is not finite', () => {
    const keys = Float64Array.from([0.3, NaN, 0.1, Infinity, 0.2, -Infinity, 0.1]);
    const indices = [0, 1, 2, 3, 4, 5, 6];
    expect(orderByKey(indices, keys)).toEqual(plainOrder(indices, keys));
  });

  it('sorts a long run across many merge passes', () => {
    const keys = Float64Array.from({ length: 5000 }, (_, i) => ((i * 7919) % 101) / 101);
    const indices = Array.from({ length: 5000 }, (_, i) => i);
    expect(orderByKey(indices, keys)).toEqual(plainOrder(indices, keys));
  });
});
