import fc from 'fast-check';
import { formatIsoDate } from '../../src/calendar/days.js';
import { METRIC_IDS } from '../../src/ingest/schema.js';

/** A small CSV writer for tests: quotes a field when it must, or when asked to. */
export interface Layout {
  readonly delimiter: ',' | ';' | '\t' | '|';
  readonly decimal: '.' | ',';
  readonly eol: '\n' | '\r\n' | '\r';
  readonly bom: boolean;
  readonly trailingEol: boolean;
  readonly autoDelimiter: boolean;
}

export type Cell = string | number | boolean | null;
export type Row = Record<string, Cell>;

export interface Table {
  readonly columns: readonly string[];
  readonly rows: readonly Row[];
  /** Per row and column: write the field in quotes even when it does not need them. */
  readonly quoteAll: readonly boolean[];
}

export function quoteField(value: string, delimiter: string, force: boolean): string {
  const needs = force || value.includes(delimiter) || value.includes('"') || /[\r\n]/.test(value) || value !== value.trim();
  return needs ? `"${value.replaceAll('"', '""')}"` : value;
}

function cellText(value: Cell, column: string, layout: Layout): string {
  if (value === null) return '';
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  if (typeof value === 'number') {
    if (column === 'date' || column === 'as_of' || column === 'inception') return formatIsoDate(value);
    const text = String(value);
    return layout.decimal === ',' ? text.replace('.', ',') : text;
  }
  return value;
}

/** Writes a table; returns the CSV text and the physical line on which each row starts. */
export function writeCsv(table: Table, layout: Layout): { text: string; lines: number[] } {
  const records = table.rows.map((row, r) =>
    table.columns.map((column) => quoteField(cellText(row[column], column, layout), layout.delimiter, table.quoteAll[r] ?? false)).join(layout.delimiter),
  );
  const lines: number[] = [];
  let line = 2;
  for (const record of records) {
    lines.push(line);
    line += 1 + (record.match(/\r\n|\r|\n/g)?.length ?? 0);
  }
  const body = [table.columns.join(layout.delimiter), ...records].join(layout.eol);
  return { text: (layout.bom ? '\ufeff' : '') + body + (layout.trailingEol ? layout.eol : ''), lines };
}

export const layoutArb: fc.Arbitrary<Layout> = fc
  .record({
    delimiter: fc.constantFrom(',' as const, ';' as const, '\t' as const, '|' as const),
    decimal: fc.constantFrom('.' as const, ',' as const),
    eol: fc.constantFrom('\n' as const, '\r\n' as const, '\r' as const),
    bom: fc.boolean(),
    trailingEol: fc.boolean(),
    autoDelimiter: fc.boolean(),
  })
  .map((layout) => (layout.delimiter === ',' ? { ...layout, decimal: '.' as const } : layout));

export function profileFor(layout: Layout): Record<string, unknown> {
  return { delimiter: layout.autoDelimiter ? 'auto' : layout.delimiter === '\t' ? '\\t' : layout.delimiter, decimal: layout.decimal };
}

/** Unicode text that survives trimming: non-empty, no surrounding space. */
const unicodeText = (withLineBreaks: boolean) =>
  fc
    .oneof(
      fc.string({ unit: 'grapheme', minLength: 1, maxLength: 12 }),
      fc.string({ unit: fc.constantFrom('a', 'Z', '"', ',', ';', '|', '\t', ' ', 'é', '€', '名', '😀', '\n', '\r'), minLength: 1, maxLength: 10 }),
    )
    .filter((s) => s.trim() === s && s !== '' && (withLineBreaks || !/[\r\n]/.test(s)));

/** What the identifier rule refuses (src/ingest/identifiers.ts, tested in identifiers.test.ts). */
const UNSAFE_IN_ID = /[\p{Cc}\p{Cf}\uFFFD]/u;

/**
 * Series ids: unicode, may hold quotes and delimiters, never line breaks (an id is one line),
 * never control or invisible characters (those rows are rejected by rule).
 */
export const idArb = unicodeText(false).filter((s) => !UNSAFE_IN_ID.test(s));
export const nameArb = unicodeText(true);
const optional = <T>(arb: fc.Arbitrary<T>) => fc.option(arb, { nil: null, freq: 3 });
const dayArb = fc.integer({ min: -25_000, max: 60_000 });
const numberArb = fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => (x === 0 ? 0 : x));

const rowsOf = <T>(row: fc.Arbitrary<T>) => fc.array(row, { maxLength: 25 });

export const navTableArb: fc.Arbitrary<Table> = rowsOf(fc.record({ series_id: idArb, date: dayArb, nav: numberArb })).chain((rows) =>
  fc.array(fc.boolean(), { minLength: rows.length, maxLength: rows.length }).map((quoteAll) => ({ columns: ['series_id', 'date', 'nav'], rows, quoteAll })),
);

const MASTER_OPTIONAL = ['name', 'category', 'currency', 'calendar', 'rate_id', 'stable_value', 'inception'] as const;

export const masterTableArb: fc.Arbitrary<Table> = fc
  .tuple(
    fc.subarray([...MASTER_OPTIONAL]),
    rowsOf(
      fc.record({
        series_id: idArb,
        benchmark_id: optional(idArb),
        name: optional(nameArb),
        category: optional(nameArb),
        currency: optional(fc.constantFrom('EUR', 'USD', 'CHF', 'JPY')),
        calendar: optional(idArb),
        rate_id: optional(idArb),
        stable_value: optional(fc.boolean()),
        inception: optional(dayArb),
      }),
    ),
  )
  .chain(([optionalColumns, rows]) => {
    const columns = ['series_id', 'benchmark_id', ...optionalColumns];
    const trimmed = rows.map((row) => Object.fromEntries(columns.map((c) => [c, row[c as keyof typeof row]])) as Row);
    return fc.array(fc.boolean(), { minLength: rows.length, maxLength: rows.length }).map((quoteAll) => ({ columns, rows: trimmed, quoteAll }));
  });

const windowArb = fc.tuple(fc.integer({ min: 1, max: 120 }), fc.constantFrom('m', 'y')).map(([n, u]) => `${n}${u}`);

export const vendorTableArb: fc.Arbitrary<Table> = rowsOf(
  fc.record({
    series_id: idArb,
    as_of: dayArb,
    window: windowArb,
    metric: fc.constantFrom(...METRIC_IDS),
    value: numberArb,
    unit: optional(fc.constantFrom('decimal', 'percent')),
  }),
).chain((rows) =>
  fc
    .array(fc.boolean(), { minLength: rows.length, maxLength: rows.length })
    .map((quoteAll) => ({ columns: ['series_id', 'as_of', 'window', 'metric', 'value', 'unit'], rows, quoteAll })),
);
