import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { jsonPieces } from '../../src/report/json-pieces.js';

// The oracle is the JavaScript engine's own JSON.stringify (ECMA-262, "JSON.stringify"): the
// pieces must join to exactly its text, for every indentation the answers use and none.
const joined = (value: unknown, indent: number) => [...jsonPieces(value, indent)].join('');

const anything = fc.anything({
  maxDepth: 3,
  withBoxedValues: true,
  withNullPrototype: true,
  withDate: true,
  withMap: true,
  withSet: true,
  withTypedArray: true,
  withSparseArray: true,
});
// Long arrays are written element by element, so they need values of their own.
const withLongArrays = fc.oneof(
  anything,
  fc.array(anything, { minLength: 60, maxLength: 150 }),
  fc.dictionary(fc.string(), fc.array(fc.oneof(anything, fc.array(anything, { minLength: 65, maxLength: 80 })), { minLength: 0, maxLength: 5 })),
);

describe('JSON in pieces', () => {
  it('joins to exactly what JSON.stringify writes, for any value and indentation', () => {
    fc.assert(
      fc.property(withLongArrays, fc.constantFrom(0, 1, 2, 4), (value, indent) => {
        expect(joined(value, indent)).toBe(JSON.stringify(value, null, indent) ?? '');
      }),
      { numRuns: 300 },
    );
  });

  it('writes numbers and text deep inside long arrays as JSON.stringify does', () => {
    // Each long array is stringified inside one-element wrappers as deep as it stands, then cut out.
    const number = fc.oneof(fc.double(), fc.integer(), fc.constantFrom(-0, 1e21, 1e-7, 5e-324, Number.MAX_VALUE, Number.NaN, Infinity, -Infinity));
    const text = fc.oneof(fc.string({ unit: 'binary' }), fc.string({ unit: 'grapheme' }), fc.constantFrom('\ud800', '\udc00x', '"\\\n\t\u0000\u2028'));
    const row = fc.record({ id: text, value: number, more: fc.array(fc.oneof(number, text, fc.constant(null)), { maxLength: 3 }), inner: fc.dictionary(text, number, { maxKeys: 2 }) });
    const nested = fc.dictionary(fc.string(), fc.record({ rows: fc.array(row, { minLength: 65, maxLength: 300 }), also: fc.array(fc.array(number, { minLength: 65, maxLength: 70 }), { maxLength: 2 }) }), { minKeys: 1, maxKeys: 2 });
    fc.assert(
      fc.property(nested, fc.constantFrom(0, 1, 2, 4), (value, indent) => {
        expect(joined({ deeper: [value, { again: value }] }, indent)).toBe(JSON.stringify({ deeper: [value, { again: value }] }, null, indent));
      }),
      { numRuns: 60 },
    );
  });

  it('skips what JSON skips and calls toJSON with the member name', () => {
    const seen: string[] = [];
    const value = {
      gone: undefined,
      call: () => 1,
      kept: [undefined, () => 1, Number.NaN, -0, Infinity],
      stamp: new Date(Date.UTC(2026, 10, 30)),
      custom: { toJSON: (key: string) => (seen.push(key), `named ${key}`) },
      long: Array.from({ length: 70 }, (_, i) => ({ i, nested: [i, { deep: i }] })),
    };
    expect(joined(value, 2)).toBe(JSON.stringify(value, null, 2));
    expect(seen).toEqual(['custom', 'custom']); // once here, once by the oracle
  });

  it('writes a long array in pieces of at most 128 elements, never as one text', () => {
    const rows = Array.from({ length: 1000 }, (_, i) => ({ series_id: `S${i}`, values: [i, i + 1] }));
    const pieces = [...jsonPieces({ results: rows }, 2)];
    const whole = JSON.stringify({ results: rows }, null, 2);
    // 1,000 rows in pieces of 128: eight pieces of rows, none more than an eighth of the text and a little.
    expect(pieces.length).toBeGreaterThanOrEqual(Math.ceil(1000 / 128));
    expect(Math.max(...pieces.map((piece) => piece.length))).toBeLessThan((whole.length * 128) / 1000 + 100);
    expect(pieces.join('')).toBe(JSON.stringify({ results: rows }, null, 2));
  });

  it('tells toJSON inside a long array its index in the whole array, as JSON.stringify does', () => {
    const named = Array.from({ length: 300 }, () => ({ toJSON: (key: string) => `at ${key}` }));
    expect(joined({ named }, 1)).toBe(JSON.stringify({ named }, null, 1));
    expect(joined({ named }, 1)).toContain('"at 299"');
  });
});
