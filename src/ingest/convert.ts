import { BusinessCalendars } from '../calendar/business-calendar.js';
import { buildSeriesFrame, type SeriesFrame } from '../series/frame.js';
import type { CorporateActionKind, CorporateActionRecord, SeriesMasterRecord, VendorFigureRecord } from './records.js';
import { SERIES_COLUMNS, type ColumnName, type FileKind, type MetricId, type SeriesFileKind } from './schema.js';
import {
  NULL_BOOLEAN,
  NULL_DATE,
  booleanColumn,
  dateColumn,
  numberColumn,
  textAt,
  textColumn,
  type CanonicalTable,
} from './table.js';

/** Turns canonical tables into the shapes checks and metrics use. */

/**
 * A table's columns, looked up only by the names its file's description (schema.ts) declares:
 * a misspelt or removed column is a type error, not an undefined column at run time.
 */
function columnsOf<K extends FileKind>(table: CanonicalTable, _kind: K) {
  return {
    text: (name: ColumnName<K> | `${ColumnName<K>}_text`) => textColumn(table, name),
    date: (name: ColumnName<K>) => dateColumn(table, name),
    number: (name: ColumnName<K>) => numberColumn(table, name),
    boolean: (name: ColumnName<K>) => booleanColumn(table, name),
  };
}

export function toSeriesFrame(table: CanonicalTable, kind: SeriesFileKind): SeriesFrame {
  const names = SERIES_COLUMNS[kind];
  const columns = columnsOf(table, kind);
  const ids = columns.text(names.id)!;
  return buildSeriesFrame({
    codes: ids.codes,
    dictionary: ids.dictionary,
    dates: columns.date(names.date)!,
    values: columns.number(names.value)!,
    lines: table.lines,
  });
}

export function toMasterRecords(table: CanonicalTable): SeriesMasterRecord[] {
  const columns = columnsOf(table, 'master');
  const [ids, benchmarks, names, categories, currencies, calendars, rates] = (
    ['series_id', 'benchmark_id', 'name', 'category', 'currency', 'calendar', 'rate_id'] as const
  ).map(columns.text);
  const stable = columns.boolean('stable_value');
  const inception = columns.date('inception');
  return Array.from({ length: table.length }, (_, row) => ({
    series_id: textAt(ids, row)!,
    benchmark_id: textAt(benchmarks, row),
    name: textAt(names, row),
    category: textAt(categories, row),
    currency: textAt(currencies, row),
    calendar: textAt(calendars, row),
    rate_id: textAt(rates, row),
    stable_value: stable !== undefined && stable[row] !== NULL_BOOLEAN && stable[row] === 1,
    inception: inception === undefined || inception[row] === NULL_DATE ? null : inception[row],
    line: table.lines[row],
  }));
}

export function toCorporateActions(table: CanonicalTable): CorporateActionRecord[] {
  const columns = columnsOf(table, 'actions');
  const ids = columns.text('series_id');
  const kinds = columns.text('kind');
  const exDates = columns.date('ex_date')!;
  const values = columns.number('value')!;
  return Array.from({ length: table.length }, (_, row) => ({
    series_id: textAt(ids, row)!,
    ex_date: exDates[row],
    kind: textAt(kinds, row) as CorporateActionKind,
    value: values[row],
    line: table.lines[row],
  })).sort((a, b) => (a.series_id < b.series_id ? -1 : a.series_id > b.series_id ? 1 : a.ex_date - b.ex_date));
}

/** Vendor figures as decimals: a `percent` row, or a value written with `%`, is divided by 100 once. */
export function toVendorFigures(table: CanonicalTable): VendorFigureRecord[] {
  const columns = columnsOf(table, 'vendor');
  const [ids, windows, metrics, units, written] = (['series_id', 'window', 'metric', 'unit', 'value_text'] as const).map(columns.text);
  const asOf = columns.date('as_of')!;
  const values = columns.number('value')!;
  return Array.from({ length: table.length }, (_, row) => {
    const unit = textAt(units, row) === 'percent' ? 'percent' : 'decimal';
    const rawValue = textAt(written, row) ?? String(values[row]);
    const alreadyDecimal = rawValue.includes('%');
    return {
      series_id: textAt(ids, row)!,
      as_of: asOf[row],
      window: textAt(windows, row)!,
      metric: textAt(metrics, row) as MetricId, // validated against METRIC_IDS on the way in
      value: unit === 'percent' && !alreadyDecimal ? values[row] / 100 : values[row],
      unit,
      raw_value: rawValue,
      line: table.lines[row],
    } satisfies VendorFigureRecord;
  });
}

export function toCalendars(table: CanonicalTable | undefined, weekendDays?: readonly number[]): BusinessCalendars {
  const calendars = new BusinessCalendars(weekendDays);
  if (!table) return calendars;
  const columns = columnsOf(table, 'holidays');
  const names = columns.text('calendar');
  const dates = columns.date('date')!;
  for (let row = 0; row < table.length; row++) calendars.addHoliday(textAt(names, row)!, dates[row]);
  return calendars;
}
