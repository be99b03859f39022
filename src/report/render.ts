import { createRequire } from 'node:module';
import type Table from 'cli-table3';
import { jsonPieces } from './json-pieces.js';
import { csvCell, escapeHtml, markdownText } from './safe-text.js';
import { CAUTION, cellText, isEmpty, type Cell, type ReportSection, type ReportView } from './view.js';

export { escapeHtml };

/** Text that reads as a number (right-aligned in html). */
const NUMBER_TEXT = /^-?\d+(\.\d+)?(e-?\d+)?$/;

export const OUTPUT_FORMATS = ['table', 'json', 'csv', 'markdown', 'html'] as const;
export type OutputFormat = (typeof OUTPUT_FORMATS)[number];

/**
 * Renders a command's answer: json as the answer object itself, the rest from its view. The
 * view may be given as a function, so that json (which never reads it) does not build it.
 */
export function render(format: OutputFormat, answer: unknown, viewOrMaker: ReportView | (() => ReportView)): string {
  if (format === 'json') return [...jsonAnswerInPieces(answer)].join('');
  const view = typeof viewOrMaker === 'function' ? viewOrMaker() : viewOrMaker;
  switch (format) {
    case 'table':
      return renderTable(view);
    case 'csv':
      return renderCsv(view);
    case 'markdown':
      return renderMarkdown(view);
    case 'html':
      return renderHtml(view);
  }
}

/** Indentation of a command's JSON answer. */
const JSON_INDENT = 2;

/**
 * The same text as `render`, for a file: json comes in pieces (see json-pieces.ts), so a large
 * answer is never one string in memory; the other formats are rendered whole.
 */
export function renderInPieces(format: OutputFormat, answer: unknown, viewOrMaker: ReportView | (() => ReportView)): string | Iterable<string> {
  return format === 'json' ? jsonAnswerInPieces(answer) : render(format, answer, viewOrMaker);
}

/** An answer's JSON text, as `render` writes it, in pieces. */
export function jsonAnswerInPieces(answer: unknown): Iterable<string> {
  return withFinalNewline(jsonPieces(answer, JSON_INDENT));
}

export function* withFinalNewline(pieces: Iterable<string>): Generator<string> {
  yield* pieces;
  yield '\n';
}

/**
 * The terminal table library, loaded when the first table is drawn: only the `table` format
 * needs it, and a run that answers in json (a scheduler, the daily audit) never loads its ten
 * modules on its main thread. It is CommonJS, so `require` loads it at once and the renderers
 * stay synchronous.
 */
let tableClass: typeof Table | undefined;
function terminalTable(): typeof Table {
  return (tableClass ??= createRequire(import.meta.url)('cli-table3') as typeof Table);
}

/** No rule between body rows: a long report stays readable on one screen. */
const COMPACT_RULES = { mid: '', 'left-mid': '', 'mid-mid': '', 'right-mid': '' };

export function renderTable(view: ReportView, width = process.stdout.columns || Number(process.env.COLUMNS) || 140): string {
  const lines = [view.title, ...view.preface, ''];
  if (isEmpty(view)) lines.push(view.emptyText);
  for (const section of view.sections) {
    if (section.rows.length === 0) continue;
    if (section.heading) lines.push(section.heading);
    const cells = section.rows.map((row) => row.map(cellText));
    const colWidths = fitColumns(section.columns, cells, width);
    const table = new (terminalTable())({ head: [...section.columns], colWidths, wordWrap: true, chars: COMPACT_RULES, style: { head: [], border: [] } });
    for (const row of cells) table.push(row.map((text) => (NUMBER_TEXT.test(text) ? { content: text, hAlign: 'right' as const } : text)));
    lines.push(table.toString(), '');
  }
  return [...lines, CAUTION, ''].join('\n');
}

/** Natural column widths, with the widest column narrowed (and wrapped) so the table fits the terminal. */
function fitColumns(columns: readonly string[], cells: readonly string[][], width: number): number[] {
  const natural = columns.map((name, k) => 2 + Math.max(name.length, ...cells.map((row) => row[k].length)));
  const total = natural.reduce((sum, w) => sum + w + 1, 1);
  if (total <= width) return natural;
  const widest = natural.indexOf(Math.max(...natural));
  natural[widest] = Math.max(24, natural[widest] - (total - width));
  return natural;
}

/** One flat table, for spreadsheets and scripts: the view's csv section, else its first. */
export function renderCsv(view: ReportView): string {
  const section = view.csv ?? view.sections[0];
  const lines = [section.columns.map(csvCell).join(',')];
  for (const row of section.rows) lines.push(row.map((value) => csvCell(typeof value === 'number' ? value : cellText(value))).join(','));
  return lines.join('\n') + '\n';
}

export function renderMarkdown(view: ReportView): string {
  const lines = [`# ${view.title}`, '', ...view.preface.map((line) => `- ${line}`), ''];
  if (isEmpty(view)) lines.push(view.emptyText, '');
  for (const section of view.sections) if (section.rows.length > 0) lines.push(...markdownSection(section), '');
  return [...lines, `> ${CAUTION}`, ''].join('\n');
}

function markdownSection(section: ReportSection): string[] {
  const escape = markdownText;
  const lines = section.heading ? [`## ${section.heading}`, ''] : [];
  lines.push(`| ${section.columns.map(escape).join(' | ')} |`, `|${section.columns.map(() => ' --- ').join('|')}|`);
  for (const row of section.rows) lines.push(`| ${row.map((value) => escape(cellText(value))).join(' | ')} |`);
  return lines;
}

export function renderHtml(view: ReportView): string {
  const sections = view.sections.filter((section) => section.rows.length > 0).map(htmlSection).join('\n');
  const body = isEmpty(view) ? `<p>${escapeHtml(view.emptyText)}</p>` : sections;
  return `<!doctype html>
<html lang="en">
<head><meta charset="utf-8"><title>${escapeHtml(view.title)}</title>
<style>
body { font-family: system-ui, sans-serif; margin: 2rem; color: #222; }
table { border-collapse: collapse; font-size: 0.9rem; margin-bottom: 1.5rem; }
th, td { border: 1px solid #bbb; padding: 0.3rem 0.5rem; text-align: left; vertical-align: top; white-space: nowrap; }
td.prose { white-space: normal; min-width: 24rem; }
td.number { text-align: right; font-variant-numeric: tabular-nums; }
thead th { background: #eee; }
.caution { margin-top: 1.5rem; font-size: 0.85rem; color: #555; max-width: 60rem; }
</style></head>
<body>
<h1>${escapeHtml(view.title)}</h1>
<ul>${view.preface.map((line) => `<li>${escapeHtml(line)}</li>`).join('')}</ul>
${body}
<p class="caution">${escapeHtml(CAUTION)}</p>
</body>
</html>
`;
}

function htmlSection(section: ReportSection): string {
  const heading = section.heading ? `<h2>${escapeHtml(section.heading)}</h2>\n` : '';
  const head = section.columns.map((c) => `<th scope="col">${escapeHtml(c)}</th>`).join('');
  const cell = (value: Cell, column: number) => {
    const text = cellText(value);
    const kind = section.columns[column] === 'message' ? ' class="prose"' : NUMBER_TEXT.test(text) ? ' class="number"' : '';
    return `<td${kind}>${escapeHtml(text)}</td>`;
  };
  const body = section.rows.map((row) => `<tr>${row.map(cell).join('')}</tr>`).join('\n');
  return `${heading}<table>\n<thead><tr>${head}</tr></thead>\n<tbody>\n${body}\n</tbody>\n</table>`;
}

