import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { buildSeriesFrame, isSharedFrame, sharedFrame } from '../../src/series/frame.js';

/**
 * The series frame against the plainest statement of its rule: rows ordered by (series id,
 * date), same-date rows in file order, series ids ascending (JavaScript string order). Sorted
 * feeds take the frame's in-file-order path and others its counting sort; both must agree.
 */
const observation = fc.record({ id: fc.constantFrom('B2', 'A1', 'C3', 'A10', 'É1'), date: fc.integer({ min: 19_000, max: 19_010 }), value: fc.double({ noNaN: true }) });

function naiveFrame(rows: ReadonlyArray<{ id: string; date: number; value: number }>) {
  const order = rows.map((row, index) => ({ ...row, line: index + 2 }));
  order.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : a.date - b.date || a.line - b.line));
  const ids = [...new Set(order.map((row) => row.id))];
  const offsets = [0, ...ids.map((id) => order.filter((row) => row.id <= id).length)];
  return { ids, offsets, dates: order.map((row) => row.date), values: order.map((row) => row.value), lines: order.map((row) => row.line) };
}

/** The frame of `rows` in file order (line k + 2 for row k), their ids coded by `dictionary`. */
function frameOfRows(rows: ReadonlyArray<{ id: string; date: number; value: number }>, dictionary: readonly string[]) {
  return buildSeriesFrame({
    codes: Int32Array.from(rows, (row) => dictionary.indexOf(row.id)),
    dictionary,
    dates: Int32Array.from(rows, (row) => row.date),
    values: Float64Array.from(rows, (row) => row.value),
    lines: Int32Array.from(rows, (_, index) => index + 2),
  });
}

function framed(rows: ReadonlyArray<{ id: string; date: number; value: number }>, dictionary: readonly string[]) {
  const frame = frameOfRows(rows, dictionary);
  return { ids: frame.ids, offsets: [...frame.offsets], dates: [...frame.dates], values: [...frame.values], lines: [...frame.lines] };
}

describe('buildSeriesFrame', () => {
  it('orders any feed as a plain sort by (id, date, line) does', () => {
    fc.assert(
      fc.property(fc.array(observation, { maxLength: 40 }), (rows) => {
        // The dictionary also holds an id no row uses, as a rejected row leaves behind.
        const dictionary = [...new Set([...rows.map((row) => row.id), 'Z9'])];
        expect(framed(rows, dictionary)).toEqual(naiveFrame(rows));
      }),
      { numRuns: 2000 },
    );
  });

  it('keeps a sorted feed in file order, same-date duplicates included', () => {
    fc.assert(
      fc.property(fc.array(observation, { maxLength: 40 }), (rows) => {
        const sorted = naiveFrame(rows);
        const seriesOfRow = (k: number) => sorted.offsets.filter((offset) => offset <= k).length - 1;
        const inOrder = sorted.dates.map((date, k) => ({ id: sorted.ids[seriesOfRow(k)], date, value: sorted.values[k] }));
        const dictionary = [...new Set(['Z9', ...inOrder.map((row) => row.id).reverse()])];
        expect(framed(inOrder, dictionary)).toEqual(naiveFrame(inOrder));
      }),
      { numRuns: 2000 },
    );
  });
});

describe('frames on shared memory', () => {
  const someRows = fc.array(observation, { maxLength: 40 });

  it('columns read onto shared memory give a frame on shared memory, the plain sort\'s frame', () => {
    fc.assert(
      fc.property(someRows, (rows) => {
        const dictionary = [...new Set(rows.map((row) => row.id))].reverse();
        const frame = buildSeriesFrame({
          codes: Int32Array.from(rows, (row) => dictionary.indexOf(row.id)),
          dictionary,
          dates: sharedCopyOf(Int32Array.from(rows, (row) => row.date)),
          values: sharedCopyOf(Float64Array.from(rows, (row) => row.value)),
          lines: sharedCopyOf(Int32Array.from(rows, (_, index) => index + 2)),
        });
        expect(isSharedFrame(frame)).toBe(true);
        const plain = { ids: frame.ids, offsets: [...frame.offsets], dates: [...frame.dates], values: [...frame.values], lines: [...frame.lines] };
        expect(plain).toEqual(naiveFrame(rows));
      }),
    );
  });

  it('sharedFrame keeps a shared frame as it is and copies an ordinary one once, row for row', () => {
    fc.assert(
      fc.property(someRows, (rows) => {
        const dictionary = ['B2', 'A1', 'C3', 'A10', 'É1'];
        const ordinary = frameOfRows(rows, dictionary);
        const shared = sharedFrame(ordinary);
        expect(isSharedFrame(shared)).toBe(true);
        expect(sharedFrame(shared)).toBe(shared);
        expect(shared.ids).toEqual(ordinary.ids);
        for (const column of ['offsets', 'dates', 'values', 'lines'] as const) expect([...shared[column]]).toEqual([...ordinary[column]]);
      }),
    );
  });
});

function sharedCopyOf<T extends Int32Array | Float64Array>(array: T): T {
  const copy = new (array.constructor as { new (buffer: SharedArrayBuffer): T })(new SharedArrayBuffer(array.byteLength));
  copy.set(array);
  return copy;
}
