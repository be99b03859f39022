/** The day's report: one object, rendered as HTML, Markdown, CSV, JSON and a terminal summary. See docs/report.md. */
export { buildDailyReport, headline, type DailyReport, type DailyInputs } from './daily-report.js';
export { navChart, type NavChart } from './chart-data.js';
export { renderDailyHtml } from './daily-html.js';
export { renderDailyMarkdown, renderDailyCsv } from './daily-text.js';
export { renderDailyTerminal } from './daily-terminal.js';
export { dailyFiles, DAILY_FILES, figuresCsv } from './write-daily.js';
export { figureFlags, flagFigures, flagsOfMarkedFigures, type FigureFlags, type FlaggedFigure } from './figure-flags.js';
