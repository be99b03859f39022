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
const METRIC_IDS_LIST: readonly MetricId[] = METRIC_IDS;

/** A column of one file's description, with its name, type and nullability kept as literal types. */
interface Described<N extends string, T extends ColumnType, Nullable extends boolean, V = ValueOf<T>> extends ColumnSpec {
  readonly name: N;
  readonly type: T;
  readonly nullable: Nullable;
  /** Only for the type derivation: the value a row holds in this column. */
  readonly __value?: V;
}

/** The TypeScript type a column's values take once read. */
type ValueOf<T extends ColumnType> = T extends 'date' ? number : T extends 'number' ? number : T extends 'boolean' ? boolean : string;

const required = <const N extends string, const T extends ColumnType>(name: N, type: T): Described<N, T, false> => ({ name, type, required: true, nullable: false });
const optional = <const N extends string, const T extends ColumnType>(name: N, type: T): Described<N, T, true> => ({ name, type, required: false, nullable: true });
/** A column the header must have, whose value a row may leave empty. */
const blankable = <const N extends string, const T extends ColumnType>(name: N, type: T): Described<N, T, true> => ({ name, type, required: true, nullable: true });
/** A text column whose values are one of a list; its row type is that list's union. */
const choice = <const N extends string, const V extends string>(name: N, allowed: readonly V[]): Described<N, 'text', false, V> => ({
  name,
  type: 'text',
  required: true,
  nullable: false,
  validate: oneOf(name, allowed),
});
const optionalChoice = <const N extends string, const V extends string>(name: N, allowed: readonly V[]): Described<N, 'text', true, V> => ({
  name,
  type: 'text',
  required: false,
  nullable: true,
  validate: oneOf(name, allowed),
});

function oneOf(name: string, allowed: readonly string[]): (text: string) => string | null {
  return (text) => (allowed.includes(text) ? null : `${name} "${text}" is not one of ${allowed.join(', ')}`);
}

const windowLabel = (text: string): string | null =>
  isWindowLabel(text) ? null : `window "${text}" is not a number of years or months such as 3y or 6m`;

/**
 * Each canonical file described once. The readers take their columns, types and checks from
 * here; the row types (`CanonicalRow`) and the names a converter may look up (`ColumnName`)
 * are derived from it, so a column is added or renamed in this one place.
 */
export const CANONICAL_COLUMNS = {
  nav: [required('series_id', 'id'), required('date', 'date'), required('nav', 'number')],
  benchmarks: [required('benchmark_id', 'id'), required('date', 'date'), required('level', 'number')],
  rates: [required('rate_id', 'id'), required('date', 'date'), required('rate', 'number')],
  master: [
    required('series_id', 'id'),
    blankable('benchmark_id', 'text'),
    optional('name', 'text'),
    optional('category', 'text'),
    optional('currency', 'text'),
    optional('calendar', 'text'),
    optional('rate_id', 'text'),
    optional('stable_value', 'boolean'),
    optional('inception', 'date'),
  ],
  holidays: [required('calendar', 'id'), required('date', 'date')],
  actions: [required('series_id', 'id'), required('ex_date', 'date'), choice('kind', ['split', 'distribution'] as const), required('value', 'number')],
  vendor: [
    required('series_id', 'id'),
    required('as_of', 'date'),
    { ...required('window', 'text'), validate: windowLabel },
    choice('metric', METRIC_IDS_LIST),
    { ...required('value', 'number'), keepsText: true },
    optionalChoice('unit', ['decimal', 'percent'] as const),
  ],
} as const satisfies Readonly<Record<FileKind, readonly ColumnSpec[]>>;

type Columns<K extends FileKind> = (typeof CANONICAL_COLUMNS)[K][number];

/** The column names of one file, as its description has them. */
export type ColumnName<K extends FileKind> = Columns<K>['name'];

/** One row of a canonical file as its description types it (empty optional values are null). */
export type CanonicalRow<K extends FileKind> = {
  readonly [C in Columns<K> as C['name']]: NonNullable<C['__value']> | (C['nullable'] extends false ? never : null);
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
