import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { readCsvFile } from '../../src/ingest/csv-source.js';
import { ConfigError, InputError } from '../../src/ingest/errors.js';
import { DEFAULT_PROFILE } from '../../src/ingest/profile.js';

const path = (name: string) => fileURLToPath(new URL(`../../fixtures/malformed/${name}`, import.meta.url));
const read = (name: string) => readCsvFile(path(name), 'nav', DEFAULT_PROFILE);

describe('fixtures/malformed, as its README describes', () => {
  it.each([
    ['bad-dates.csv', 4, [3, 4]],
    ['bad-numbers.csv', 4, [3, 4]],
    ['field-count.csv', 4, [3, 4]],
    ['unbalanced-quote.csv', 3, [3]],
    ['header-only.csv', 0, []],
    ['bom-crlf.csv', 3, [4]],
    ['day-first.csv', 3, [4]],
  ])('%s', (name, read_, rejectedLines) => {
    const result = read(name);
    expect(result.rows).toEqual({ read: read_, accepted: read_ - rejectedLines.length, rejected: rejectedLines.length });
    expect(result.rejected.map((r) => r.line)).toEqual(rejectedLines);
    for (const row of result.rejected) expect(row.file).toBe(path(name));
  });

  it('bom-crlf.csv and day-first.csv accept the right values', () => {
    const bom = read('bom-crlf.csv');
    expect(Array.from(bom.table.lines)).toEqual([2, 5]);
    expect(Array.from((bom.table.columns.nav as { values: Float64Array }).values)).toEqual([100, 50.5]);
    const dayFirst = read('day-first.csv');
    expect(Array.from((dayFirst.table.columns.date as { values: Int32Array }).values)).toEqual([20514, 20543]); // 2026-03-02, 2026-03-31
  });

  it.each([
    ['empty.csv', InputError, 3],
    ['no-usable-header.csv', InputError, 3],
    ['ambiguous-dates.csv', ConfigError, 2],
  ] as const)('%s stops the command', (name, type, exitCode) => {
    expect(() => read(name)).toThrow(type);
    try {
      read(name);
    } catch (error) {
      expect((error as InputError).exitCode).toBe(exitCode);
      expect((error as Error).message.startsWith(`${path(name)}, line `)).toBe(true);
    }
  });
});
