/**
 * The small reference files (series master, corporate actions, vendor figures) become arrays of
 * plain records after parsing: they hold thousands of rows, not millions, and are looked up by id.
 * Time series (NAVs, benchmark levels, risk-free rates) become series frames instead.
 */
export interface SeriesMasterRecord {
  readonly series_id: string;
  readonly benchmark_id: string | null;
  readonly name: string | null;
  readonly category: string | null;
  /** ISO 4217 code, as written in the master. */
  readonly currency: string | null;
  /** Holiday calendar name; null means the default calendar. */
  readonly calendar: string | null;
  readonly rate_id: string | null;
  /** True for money-market and other funds whose NAV is held stable or accrues smoothly. */
  readonly stable_value: boolean;
  /** Epoch day of inception, or null. */
  readonly inception: number | null;
  readonly line: number;
}

export type CorporateActionKind = 'split' | 'distribution';

export interface CorporateActionRecord {
  readonly series_id: string;
  /** Epoch day. */
  readonly ex_date: number;
  readonly kind: CorporateActionKind;
  /** `split`: new units per old unit; `distribution`: amount paid per unit. */
  readonly value: number;
  readonly line: number;
}

export interface VendorFigureRecord {
  readonly series_id: string;
  /** Epoch day. */
  readonly as_of: number;
  /** Window label as written, such as `3y`. */
  readonly window: string;
  readonly metric: string;
  /** Always a decimal once read: a `percent` row is divided by 100 on the way in. */
  readonly value: number;
  /** The unit the vendor wrote, kept for evidence. */
  readonly unit: 'decimal' | 'percent';
  /** The value exactly as written, for the printed precision. */
  readonly raw_value: string;
  readonly line: number;
}

/** A data row that could not be read: never dropped, always reported. */
export interface RejectedRow {
  readonly file: string;
  readonly line: number;
  readonly raw: string;
  readonly reason: string;
}

export interface RowAccounting {
  read: number;
  accepted: number;
  rejected: number;
}
