import { isWindowLabel } from '../metrics/windows.js';

/** The canonical files of docs/interface.md and their columns. */
export const FILE_KINDS = ['nav', 'benchmarks', 'master', 'rates', 'holidays', 'actions', 'vendor'] as const;
export type FileKind = (typeof FILE_KINDS)[number];

/** `id` and `text` are dictionary-coded strings; `id` is never empty. */
export type ColumnType = 'id' | 'text' | 'date' | 'number' | 'boolean';

export interface ColumnSpec {
  readonly name: string;
  readonly type: ColumnType;
  /** The header must have the column. */
  readonly required: boolean;
  /** A row may leave the value empty (always so for optional columns). */
  readonly nullable: boolean;
  /** For text columns: why a value is not allowed, or null when it is. */
  readonly validate?: (text: string) => string | null;
  /**
   * Also keep the value as written, in a text column named `<name>_text`: the vendor's printed
   * precision decides the rounding tolerance, and `0.10` must not become `0.1`.
   */
  readonly keepsText?: boolean;
}

const column = (name: string, type: ColumnType, required = true): ColumnSpec => ({
  name,
  type,
  required,
  nullable: !required,
});

const oneOf =
  (name: string, allowed: readonly string[]) =>
  (text: string): string | null =>
    allowed.includes(text) ? null : `${name} "${text}" is not one of ${allowed.join(', ')}`;

const windowLabel = (text: string): string | null =>
  isWindowLabel(text) ? null : `window "${text}" is not a number of years or months such as 3y or 6m`;

export const CANONICAL_COLUMNS: Readonly<Record<FileKind, readonly ColumnSpec[]>> = {
  nav: [column('series_id', 'id'), column('date', 'date'), column('nav', 'number')],
  benchmarks: [column('benchmark_id', 'id'), column('date', 'date'), column('level', 'number')],
  rates: [column('rate_id', 'id'), column('date', 'date'), column('rate', 'number')],
  master: [
    column('series_id', 'id'),
    { ...column('benchmark_id', 'text'), nullable: true },
    column('name', 'text', false),
    column('category', 'text', false),
    column('currency', 'text', false),
    column('calendar', 'text', false),
    column('rate_id', 'text', false),
    column('stable_value', 'boolean', false),
    column('inception', 'date', false),
  ],
  holidays: [column('calendar', 'id'), column('date', 'date')],
  actions: [column('series_id', 'id'), column('ex_date', 'date'), { ...column('kind', 'text'), validate: oneOf('kind', ['split', 'distribution']) }, column('value', 'number')],
  vendor: [
    column('series_id', 'id'),
    column('as_of', 'date'),
    { ...column('window', 'text'), validate: windowLabel },
    { ...column('metric', 'text'), validate: (text) => oneOf('metric', METRIC_IDS)(text) },
    { ...column('value', 'number'), keepsText: true },
    { ...column('unit', 'text', false), validate: oneOf('unit', ['decimal', 'percent']) },
  ],
};

/** For the three time-series files: which columns hold the id, the date and the value. */
export const SERIES_COLUMNS = {
  nav: { id: 'series_id', date: 'date', value: 'nav' },
  benchmarks: { id: 'benchmark_id', date: 'date', value: 'level' },
  rates: { id: 'rate_id', date: 'date', value: 'rate' },
} as const;
export type SeriesFileKind = keyof typeof SERIES_COLUMNS;

export function isSeriesKind(kind: FileKind): kind is SeriesFileKind {
  return kind in SERIES_COLUMNS;
}

export const METRIC_IDS = [
  'return_annualized',
  'std_dev',
  'downside_deviation',
  'beta',
  'alpha',
  'r_squared',
  'sharpe',
  'sortino',
  'tracking_error',
  'information_ratio',
  'treynor',
  'max_drawdown',
] as const;
export type MetricId = (typeof METRIC_IDS)[number];
