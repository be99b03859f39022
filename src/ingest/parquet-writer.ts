import { writeFileSync } from 'node:fs';
import { parquetWriteBuffer, type ColumnSource, type SchemaElement } from 'hyparquet-writer';
import { LINE_COLUMN } from './arrow-table.js';
import { NULL_BOOLEAN, NULL_DATE, type CanonicalTable, type Column } from './table.js';

/**
 * Canonical tables as Parquet, with the same column types as the Arrow form: strings as UTF8
 * byte arrays (the writer dictionary-encodes them), dates as DATE (INT32 epoch days), numbers as
 * DOUBLE, booleans as BOOLEAN, missing values as nulls, plus the `line` column.
 */
export function canonicalToParquetBuffer(table: CanonicalTable): Uint8Array {
  const columnData: ColumnSource[] = [];
  const schema: SchemaElement[] = [{ name: 'root', num_children: Object.keys(table.columns).length + 1 }];
  for (const [name, column] of Object.entries(table.columns)) {
    // Dictionary pages make a reader decode each distinct string once instead of once per row.
    const encoding = column.type === 'text' ? 'RLE_DICTIONARY' : undefined;
    const required = !hasMissing(column);
    columnData.push({ name, data: required ? requiredValues(column) : parquetValues(column), encoding });
    schema.push({ ...schemaElement(name, column), repetition_type: required ? 'REQUIRED' : 'OPTIONAL' });
  }
  columnData.push({ name: LINE_COLUMN, data: table.lines });
  schema.push({ name: LINE_COLUMN, type: 'INT32', repetition_type: 'REQUIRED' });
  return new Uint8Array(parquetWriteBuffer({ columnData, schema }));
}

export function writeParquet(table: CanonicalTable, path: string): void {
  writeFileSync(path, canonicalToParquetBuffer(table));
}

function schemaElement(name: string, column: Column): SchemaElement {
  const optional = { name, repetition_type: 'OPTIONAL' } as const;
  switch (column.type) {
    case 'text':
      return { ...optional, type: 'BYTE_ARRAY', converted_type: 'UTF8', logical_type: { type: 'STRING' } };
    case 'date':
      return { ...optional, type: 'INT32', converted_type: 'DATE', logical_type: { type: 'DATE' } };
    case 'number':
      return { ...optional, type: 'DOUBLE' };
    case 'boolean':
      return { ...optional, type: 'BOOLEAN' };
  }
}

function hasMissing(column: Column): boolean {
  switch (column.type) {
    case 'text':
      return column.codes.some((code) => code < 0);
    case 'date':
      return column.values.some((day) => day === NULL_DATE);
    case 'number':
      return column.values.some(Number.isNaN);
    case 'boolean':
      return column.values.some((flag) => flag === NULL_BOOLEAN);
  }
}

/** Columns without nulls are written REQUIRED from typed arrays, which readers decode faster. */
function requiredValues(column: Column): (string | boolean)[] | Int32Array | Float64Array {
  switch (column.type) {
    case 'date':
    case 'number':
      return column.values;
    default:
      return parquetValues(column) as (string | boolean)[];
  }
}

/** One JS value per row with null for missing: the shape hyparquet-writer takes for nullable columns. */
function parquetValues(column: Column): (string | number | boolean | null)[] {
  switch (column.type) {
    case 'text':
      return Array.from(column.codes, (code) => (code < 0 ? null : column.dictionary[code]));
    case 'date':
      return Array.from(column.values, (day) => (day === NULL_DATE ? null : day));
    case 'number':
      return Array.from(column.values, (value) => (Number.isNaN(value) ? null : value));
    case 'boolean':
      return Array.from(column.values, (flag) => (flag === NULL_BOOLEAN ? null : flag === 1));
  }
}
