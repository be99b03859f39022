import { join } from 'node:path';
import { jsonPieces } from '../json-pieces.js';
import { withFinalNewline } from '../render.js';
import { csvCell, csvLine, memoizedCsvCell } from '../safe-text.js';
import { TextPieceBuilder } from '../text-pieces.js';
import { ticketsToCsv, ticketsToJsonLines } from '../../tickets/export.js';
import type { FigureFlags } from './figure-flags.js';
import { renderDailyHtml } from './daily-html.js';
import { dailyCsvInPieces, renderDailyMarkdown } from './daily-text.js';
import type { DailyReport } from './daily-report.js';

/** Names of the day's files in the output directory. */
export const DAILY_FILES = {
  html: 'report.html',
  markdown: 'report.md',
  csv: 'report.csv',
  json: 'report.json',
  ticketsJsonLines: 'tickets.jsonl',
  ticketsCsv: 'tickets.csv',
  figures: 'figures.csv',
} as const;

/**
 * The day's files, by name, each made only when its maker is called, so the caller can write one
 * and let it go before making the next (at 10,000 series `report.json` alone is about 77 MB).
 */
export function dailyFiles(report: DailyReport, flaggedFigures: FigureFlags | null): Record<string, () => string | Iterable<string>> {
  const files: Record<string, () => string | Iterable<string>> = {
    [DAILY_FILES.html]: () => renderDailyHtml(report),
    [DAILY_FILES.markdown]: () => renderDailyMarkdown(report),
    [DAILY_FILES.csv]: () => dailyCsvInPieces(report),
    [DAILY_FILES.json]: () => withFinalNewline(jsonPieces(report, 1)),
    [DAILY_FILES.ticketsJsonLines]: () => ticketsToJsonLines(report.tickets.records),
    [DAILY_FILES.ticketsCsv]: () => ticketsToCsv(report.tickets.records),
  };
  if (flaggedFigures) files[DAILY_FILES.figures] = () => figuresCsv(flaggedFigures);
  return files;
}

/** Every figure, flat, with the flag of an error-level finding in its window: the file the report links, in pieces. */
export function* figuresCsv({ figures, flags }: FigureFlags): Generator<string> {
  const out = new TextPieceBuilder();
  // csvLine's cells; a text cell's form kept per text, as ids, windows and metrics repeat.
  const cell = memoizedCsvCell();
  out.text(csvLine(FIGURES_CSV_COLUMNS));
  out.code(LINE_FEED);
  for (let index = 0; index < figures.length; index++) {
    const f = figures[index];
    const flagged_by = flags[index];
    out.text(cell(f.series_id));
    out.code(COMMA);
    out.text(cell(f.window));
    out.code(COMMA);
    out.text(cell(f.metric));
    out.code(COMMA);
    out.text(csvCell(f.value));
    out.code(COMMA);
    out.text(csvCell(f.observations));
    out.code(COMMA);
    if (f.reason !== undefined && f.reason !== null) out.text(cell(f.reason));
    out.code(COMMA);
    if (flagged_by.length > 0) out.text(csvCell(flagged_by.join(' ')));
    out.code(LINE_FEED);
    if (out.full) yield out.take();
  }
  const last = out.take();
  if (last.length > 0) yield last;
}

const FIGURES_CSV_COLUMNS = ['series_id', 'window', 'metric', 'value', 'observations', 'reason', 'flagged_by'];
const COMMA = 0x2c;
const LINE_FEED = 0x0a;

export function dailyPaths(dir: string): Record<keyof typeof DAILY_FILES, string> {
  return Object.fromEntries(Object.entries(DAILY_FILES).map(([k, name]) => [k, join(dir, name)])) as Record<keyof typeof DAILY_FILES, string>;
}
