/**
 * A report view: the rows a person reads, shared by the table, csv, markdown and html outputs.
 * The json output is the command's own answer object (docs/interface.md), not a view.
 */
export interface ReportView {
  readonly title: string;
  /** Lines shown above the rows: as-of date, row accounting, counts. */
  readonly preface: readonly string[];
  readonly sections: readonly ReportSection[];
  /** Shown when there are no rows. */
  readonly emptyText: string;
  /** The one flat table the csv output gives, when it differs from the first section. */
  readonly csv?: ReportSection;
}

export type Cell = string | number | null;

export interface ReportSection {
  /** A heading above the section's table; null for a view's only table. */
  readonly heading: string | null;
  readonly columns: readonly string[];
  readonly rows: ReadonlyArray<ReadonlyArray<Cell>>;
}

/** A view holding one table. */
export function tableView(title: string, preface: readonly string[], columns: readonly string[], rows: ReadonlyArray<ReadonlyArray<Cell>>, emptyText: string): ReportView {
  return { title, preface, sections: [{ heading: null, columns, rows }], emptyText };
}

export function isEmpty(view: ReportView): boolean {
  return view.sections.every((section) => section.rows.length === 0);
}

/** The caution every report that people act on carries. */
export const CAUTION =
  'Risk figures describe the past and are no guarantee of future results. navassay checks data and arithmetic; ' +
  "it gives no advice, and what may be published is decided by the firm's compliance function under its local rules.";

export function cellText(value: Cell): string {
  if (value === null) return '';
  if (typeof value === 'number') return Number.isInteger(value) ? String(value) : formatNumber(value);
  return value;
}

/** Up to 6 significant decimals, no trailing zeros: enough to compare with a printed figure. */
export function formatNumber(value: number): string {
  if (!Number.isFinite(value)) return String(value);
  const fixed = Math.abs(value) >= 1e-4 || value === 0 ? value.toFixed(6) : value.toExponential(4);
  return fixed.includes('e') ? fixed : fixed.replace(/\.?0+$/, '');
}
