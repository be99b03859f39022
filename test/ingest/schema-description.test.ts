import { describe, expect, expectTypeOf, it } from 'vitest';
import type { CorporateActionRecord, SeriesMasterRecord, VendorFigureRecord } from '../../src/ingest/records.js';
import { CANONICAL_COLUMNS, type CanonicalRow, type ColumnName, type MetricId } from '../../src/ingest/schema.js';

/**
 * Each canonical file is described once (schema.ts); the row types and the names a converter
 * may look up are derived from that description. These assertions are checked by the type
 * checker (`npm test` runs tsc first) and by vitest.
 */
describe('one description per canonical file', () => {
  it('derives the column names and row types from the description', () => {
    expectTypeOf<ColumnName<'nav'>>().toEqualTypeOf<'series_id' | 'date' | 'nav'>();
    expectTypeOf<CanonicalRow<'master'>['benchmark_id']>().toEqualTypeOf<string | null>(); // required header, value may be empty
    expectTypeOf<CanonicalRow<'master'>['inception']>().toEqualTypeOf<number | null>(); // optional date: epoch day or null
    expectTypeOf<CorporateActionRecord['kind']>().toEqualTypeOf<'split' | 'distribution'>();
    expectTypeOf<VendorFigureRecord['metric']>().toEqualTypeOf<MetricId>();
    expectTypeOf<VendorFigureRecord['unit']>().toEqualTypeOf<'decimal' | 'percent'>();
    expectTypeOf<SeriesMasterRecord['stable_value']>().toEqualTypeOf<boolean>();
    // @ts-expect-error a column the master does not describe
    expectTypeOf<CanonicalRow<'master'>['benchmark']>().toBeString();
  });

  it('describes the columns of docs/interface.md, in its order', () => {
    // docs/interface.md, "Canonical input files" (optional columns in brackets there).
    expect(CANONICAL_COLUMNS.master.map((c) => (c.required ? c.name : `[${c.name}]`)).join(', ')).toBe(
      'series_id, benchmark_id, [name], [category], [currency], [calendar], [rate_id], [stable_value], [inception]',
    );
    expect(CANONICAL_COLUMNS.vendor.map((c) => (c.required ? c.name : `[${c.name}]`)).join(', ')).toBe('series_id, as_of, window, metric, value, [unit]');
    expect(CANONICAL_COLUMNS.actions.find((c) => c.name === 'kind')!.validate!('merger')).toBe('kind "merger" is not one of split, distribution');
  });
});
