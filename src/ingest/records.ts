import type { CanonicalRow } from './schema.js';

/**
 * The small reference files (series master, corporate actions, vendor figures) become arrays of
 * plain records after parsing: they hold thousands of rows, not millions, and are looked up by id.
 * Time series (NAVs, benchmark levels, risk-free rates) become series frames instead.
 */
/**
 * A series master row: the columns of `CANONICAL_COLUMNS.master` (dates are epoch days,
 * `calendar` null means the default calendar, `currency` an ISO 4217 code as written), with
 * `stable_value` (money-market and other funds whose NAV is held stable or accrues smoothly)
 * false when left empty, and the source line.
 */
export type SeriesMasterRecord = Omit<CanonicalRow<'master'>, 'stable_value'> & {
  readonly stable_value: boolean;
  readonly line: number;
};

export type CorporateActionKind = CanonicalRow<'actions'>['kind'];

/** A corporate action row (`ex_date` an epoch day; `value`: new units per old unit for a split, amount per unit for a distribution). */
export type CorporateActionRecord = CanonicalRow<'actions'> & { readonly line: number };

/**
 * A vendor figure row (`as_of` an epoch day, `window` as written such as `3y`), with `value`
 * always a decimal once read (a `percent` row is divided by 100 on the way in), the unit the
 * vendor wrote (decimal when left empty), the value exactly as written (for the printed
 * precision) and the source line.
 */
export type VendorFigureRecord = Omit<CanonicalRow<'vendor'>, 'unit'> & {
  readonly unit: NonNullable<CanonicalRow<'vendor'>['unit']>;
  readonly raw_value: string;
  readonly line: number;
};

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
