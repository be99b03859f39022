import { formatIsoDate, parseIsoDate } from '../../src/calendar/days.js';
import { TextDictionaryBuilder } from '../../src/ingest/columnar-ingest.js';
import { CANONICAL_COLUMNS, type ColumnType, type FileKind } from '../../src/ingest/schema.js';
import { NULL_BOOLEAN, NULL_DATE, type CanonicalTable, type Column } from '../../src/ingest/table.js';

/** Test-side convenience: canonical tables from plain rows and back. Dates are ISO text here. */
export type Cell = string | number | boolean | null;
export type Row = Record<string, Cell>;

function typeOf(kind: FileKind, name: string): ColumnType {
  if (name.endsWith('_text')) return 'text';
  const spec = CANONICAL_COLUMNS[kind].find((column) => column.name === name);
  if (!spec) throw new Error(`no column ${name} in ${kind}`);
  return spec.type;
}

export function tableFromRows(kind: FileKind, columnNames: readonly string[], rows: readonly Row[], lines?: number[]): CanonicalTable {
  const columns: Record<string, Column> = {};
  for (const name of columnNames) columns[name] = columnFromCells(typeOf(kind, name), rows.map((row) => row[name] ?? null));
  return {
    kind,
    length: rows.length,
    lines: Int32Array.from(lines ?? rows.map((_, row) => row + 1)),
    columns,
  };
}

function columnFromCells(type: ColumnType, cells: readonly Cell[]): Column {
  switch (type) {
    case 'id':
    case 'text': {
      const builder = new TextDictionaryBuilder(cells.length);
      cells.forEach((cell, row) => builder.set(row, cell as string | null));
      return builder.finish();
    }
    case 'date':
      return { type: 'date', values: Int32Array.from(cells, (cell) => (cell === null ? NULL_DATE : dayOf(cell))) };
    case 'number':
      return { type: 'number', values: Float64Array.from(cells, (cell) => (cell === null ? NaN : (cell as number))) };
    case 'boolean':
      return { type: 'boolean', values: Uint8Array.from(cells, (cell) => (cell === null ? NULL_BOOLEAN : cell ? 1 : 0)) };
  }
}

/** A date cell is ISO text, or a raw epoch day number for days outside years 0–9999. */
function dayOf(cell: Cell): number {
  if (typeof cell === 'number') return cell;
  const day = parseIsoDate(String(cell));
  if (day === null) throw new Error(`not an ISO date: ${cell}`);
  return day;
}

/** The rows of a table with decoded values: text, ISO dates (or epoch days outside 0–9999), numbers, booleans. */
export function rowsOf(table: CanonicalTable): Row[] {
  return Array.from({ length: table.length }, (_, row) => {
    const out: Row = {};
    for (const [name, column] of Object.entries(table.columns)) out[name] = cellAt(column, row);
    return out;
  });
}

function cellAt(column: Column, row: number): Cell {
  switch (column.type) {
    case 'text':
      return column.codes[row] < 0 ? null : column.dictionary[column.codes[row]];
    case 'date': {
      const day = column.values[row];
      if (day === NULL_DATE) return null;
      const iso = formatIsoDate(day);
      return /^\d{4}-\d{2}-\d{2}$/.test(iso) ? iso : day;
    }
    case 'number':
      return Number.isNaN(column.values[row]) ? null : column.values[row];
    case 'boolean':
      return column.values[row] === NULL_BOOLEAN ? null : column.values[row] === 1;
  }
}
