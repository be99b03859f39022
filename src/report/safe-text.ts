/**
 * Text from a feed (ids, names, categories, vendor values) reaches spreadsheets, chat windows
 * and browsers. These are the only ways it is written into them, so none of it can act:
 * no formula in a spreadsheet, no markup or link in Markdown, no element in HTML.
 */

/** Text that is a plain number: written as it is, so a spreadsheet still reads a number. */
const NUMBER_TEXT = /^[+-]?(\d+(\.\d*)?|\.\d+)(e[+-]?\d+)?$/i;

/** A cell holding a quote, a comma or a line break needs quotes; tested by code, as a figures file has millions of cells. */
function needsQuotes(text: string): boolean {
  for (let i = 0; i < text.length; i++) {
    const code = text.charCodeAt(i);
    if (code === 0x22 || code === 0x2c || code === 0x0d || code === 0x0a) return true;
  }
  return false;
}

export function csvCell(value: string | number | boolean | null | undefined): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  let text = typeof value === 'string' ? value : String(value);
  // A leading apostrophe is how spreadsheets themselves mark a cell as text.
  if (text.length > 0 && startsFormula(text.charCodeAt(0)) && !NUMBER_TEXT.test(text)) text = `'${text}`;
  return needsQuotes(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * First characters that make a spreadsheet evaluate a cell (formula injection): = + - @ tab and
 * carriage return, by code, without a regular expression per cell (a figures file has a million).
 */
function startsFormula(code: number): boolean {
  return code === 0x3d || code === 0x2b || code === 0x2d || code === 0x40 || code === 0x09 || code === 0x0d;
}

/**
 * `csvCell` of texts, each worked out once: a file of many lines repeats its ids, windows and
 * metric names. For one file's writing (the memory grows with its distinct texts).
 */
export function memoizedCsvCell(): (text: string) => string {
  const cells = new Map<string, string>();
  return (text) => {
    let cell = cells.get(text);
    if (cell === undefined) cells.set(text, (cell = csvCell(text)));
    return cell;
  };
}

export function csvLine(values: ReadonlyArray<string | number | boolean | null | undefined>): string {
  return values.map(csvCell).join(',');
}

export function escapeHtml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

/**
 * Markdown text that renders as the same characters: markup and HTML become literal. The
 * underscore is left alone: inside a word (check ids, series ids) it never emphasises.
 */
export function markdownText(text: string): string {
  return text
    .replace(/\r?\n|\r/g, ' ')
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/([\\`*{}[\]()#+!|~])/g, '\\$1');
}
