import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Finding } from '../../src/findings.js';
import type { MetricRow, MetricsAnswer } from '../../src/metrics/compute.js';
import { DEFAULT_METHODOLOGY } from '../../src/metrics/methodology.js';
import { checkAnswer } from '../../src/report/check-answer.js';
import { buildDailyReport, renderDailyCsv } from '../../src/report/daily/index.js';
import { DAILY_CSV_COLUMNS, dailyCsvInPieces } from '../../src/report/daily/daily-text.js';
import { figureFlags, flagFigures, flagsOfMarkedFigures, type FlaggedFigure } from '../../src/report/daily/figure-flags.js';
import type { SeriesMasterRecord } from '../../src/ingest/records.js';
import { markSuspectFigures } from '../../src/reconcile/suspect-data.js';
import { FIGURES_SHOWN_AT_MOST, summarizeFigures } from '../../src/report/daily/daily-report.js';
import { needingALook } from '../../src/report/daily/reconcile-rows.js';
import { breachesFirst } from '../../src/report/daily/daily-html.js';
import { figuresCsv } from '../../src/report/daily/write-daily.js';
import { csvCell, csvLine } from '../../src/report/safe-text.js';
import { linesInPieces, TextPieceBuilder } from '../../src/report/text-pieces.js';
import { spikeFinding } from './findings.js';
import type { ReconciliationResultLike } from '../../src/tickets/ticket.js';

// Each shortcut of the reports against the plain way it replaced, written out here.

const NUMBER_TEXT = /^[+-]?(\d+(\.\d*)?|\.\d+)(e[+-]?\d+)?$/i;
function plainCsvCell(value: string | number | null): string {
  if (value === null) return '';
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  let text = value;
  if (/^[=+\-@\t\r]/.test(text) && !NUMBER_TEXT.test(text)) text = `'${text}`;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

const cellText = fc.oneof(fc.string({ unit: 'binary' }), fc.constantFrom('a,b', 'say "x"', 'line\nbreak', '\r', '=1+2', '-3', '', ',,"'));
const cellNumber = fc.oneof(fc.double(), fc.constantFrom(-0, 1e21, 5e-324, Number.NaN, Infinity, -Infinity));

describe('report shortcuts give what the plain code gave', () => {
  it('a CSV cell tested by code is the cell the regular expression gave', () => {
    fc.assert(
      fc.property(fc.oneof(cellText, cellNumber, fc.constant(null)), (value) => {
        expect(csvCell(value)).toBe(plainCsvCell(value));
      }),
      { numRuns: 2000 },
    );
  });

  it('lines in pieces join to the lines, each ended by a line break', () => {
    const line = fc.oneof(fc.string({ unit: 'binary', maxLength: 40 }), fc.string({ maxLength: 70_000 }));
    fc.assert(
      fc.property(fc.array(line, { minLength: 1, maxLength: 40 }), (lines) => {
        const pieces = [...linesInPieces(lines)];
        expect(pieces.join('')).toBe(lines.join('\n') + '\n');
        expect(pieces.every((piece) => piece.length > 0)).toBe(true);
      }),
      { numRuns: 100 },
    );
  });

  it('a text piece builder gives back exactly the texts written, in pieces taken when full', () => {
    const written = fc.oneof(
      fc.string({ unit: 'binary', maxLength: 20 }).map((text) => ({ text })),
      // Long texts, past a piece and past the buffer: it grows.
      fc.tuple(fc.integer({ min: 1, max: 150_000 }), fc.constantFrom('a', 'é', '\u{1F600}')).map(([length, unit]) => ({ text: unit.repeat(length) })),
      fc.constantFrom(0x2c, 0x0a, 0xe9).map((code) => ({ code })),
    );
    fc.assert(
      fc.property(fc.array(written, { maxLength: 60 }), (steps) => {
        const out = new TextPieceBuilder();
        const pieces: string[] = [];
        let expected = '';
        for (const step of steps) {
          if ('text' in step) out.text(step.text);
          else out.code(step.code);
          expected += 'text' in step ? step.text : String.fromCharCode(step.code);
          if (out.full) pieces.push(out.take());
        }
        pieces.push(out.take());
        expect(pieces.join('')).toBe(expected);
      }),
      { numRuns: 200 },
    );
  });

  const status = fc.constantFrom('match', 'breach', 'rounding', 'not_computable', 'other');
  const results = fc.array(fc.record({ series_id: fc.string({ maxLength: 3 }), status }), { maxLength: 300 });

  it('the results needing a look, cut at a count, are those of a stable sort by status', () => {
    const rank = (s: string) => ({ breach: 0, not_computable: 1, rounding: 2 })[s] ?? 3;
    fc.assert(
      fc.property(results, fc.oneof(fc.nat(320), fc.constant(Infinity)), (rows: ReconciliationResultLike[], atMost) => {
        const plain = rows.filter((r) => r.status !== 'match').sort((a, b) => rank(a.status) - rank(b.status));
        expect(needingALook(rows, atMost)).toEqual(plain.slice(0, atMost));
      }),
    );
  });

  it('the results the tolerance chart plots, breaches first, are those of a filter and a stable sort', () => {
    const row = fc.record({ series_id: fc.string({ maxLength: 2 }), status, vendor: fc.oneof(fc.double(), fc.constant(null)) });
    fc.assert(
      fc.property(fc.array(row, { maxLength: 120 }), fc.nat(50), (rows, count) => {
        const plottable = (r: { vendor: number | null }) => typeof r.vendor === 'number';
        const plain = rows.filter(plottable).sort((a, b) => Number(b.status === 'breach') - Number(a.status === 'breach'));
        expect(breachesFirst(rows, plottable, count)).toEqual(plain.slice(0, count));
      }),
    );
  });

  const figure = fc.record(
    {
      series_id: fc.constantFrom('S1', 'S2', '=S3', 'S,4'),
      window: fc.constantFrom('1y', '3y', '5y'),
      metric: fc.constantFrom<MetricRow['metric']>('beta', 'std_dev', 'sharpe'),
      value: fc.oneof(cellNumber, fc.constant(null)),
      observations: fc.nat(120),
      reason: fc.string({ unit: 'binary', maxLength: 12 }),
      suspect_data: fc.array(fc.constantFrom('k1', 'k2', 'k,3'), { minLength: 1, maxLength: 3 }),
    },
    { requiredKeys: ['series_id', 'window', 'metric', 'value', 'observations'] },
  );
  const finding = fc.record({
    series: fc.constantFrom('S1', 'S2', '=S3'),
    severity: fc.constantFrom<Finding['severity']>('warning', 'error', 'critical'),
    start: fc.constantFrom('2021-03-02', '2024-06-03', '2026-03-02'),
  });
  const toFinding = ({ series, severity, start }: { series: string; severity: Finding['severity']; start: string }): Finding => spikeFinding(severity, start, series);
  const answerOf = (metrics: MetricRow[]): MetricsAnswer => ({ as_of: '2026-11-30', methodology: DEFAULT_METHODOLOGY, metrics });

  it('figures.csv from the flags is the file of every flagged figure, line by line', () => {
    fc.assert(
      fc.property(fc.array(figure, { maxLength: 60 }), fc.array(finding, { maxLength: 6 }), (metrics, findings) => {
        const flagged = flagFigures(answerOf(metrics), findings.map(toFinding));
        const lines = [csvLine(['series_id', 'window', 'metric', 'value', 'observations', 'reason', 'flagged_by'])];
        for (const f of flagged) lines.push(csvLine([f.series_id, f.window, f.metric, f.value, f.observations, f.reason ?? null, f.flagged_by.join(' ')]));
        expect([...figuresCsv(figureFlags(answerOf(metrics), findings.map(toFinding)))].join('')).toBe(lines.join('\n') + '\n');
      }),
      { numRuns: 200 },
    );
  });

  it("the flags of figures the metrics stage marked are what marking them again against the same findings gave", () => {
    const ids = ['S1', 'S2', 'B1', 'B2'];
    const plainFigure = fc.record(
      {
        series_id: fc.constantFrom(...ids),
        window: fc.constantFrom('1y', '3y', '5y'),
        metric: fc.constantFrom<MetricRow['metric']>('beta', 'std_dev', 'tracking_error', 'max_drawdown'),
        value: fc.oneof(cellNumber, fc.constant(null)),
        observations: fc.nat(120),
      },
      { requiredKeys: ['series_id', 'window', 'metric', 'value', 'observations'] },
    );
    const anyFinding = fc.record({
      series: fc.constantFrom(...ids),
      severity: fc.constantFrom<Finding['severity']>('warning', 'error', 'critical'),
      start: fc.constantFrom('2021-03-02', '2023-01-16', '2024-06-03', '2026-03-02', '2026-11-30'),
    });
    // A series may be its own benchmark: its findings are then found twice.
    const master = fc.array(fc.record({ series_id: fc.constantFrom(...ids), benchmark_id: fc.oneof(fc.constantFrom(...ids), fc.constant(null)) }), { maxLength: 5 });
    fc.assert(
      fc.property(fc.array(plainFigure, { maxLength: 40 }), fc.array(anyFinding, { maxLength: 8 }), master, fc.constantFrom(null, 'B1'), (metrics, findings, records, benchmark) => {
        const all = findings.map(toFinding);
        const answer: MetricsAnswer = { as_of: '2026-11-30', methodology: { ...DEFAULT_METHODOLOGY, benchmark }, metrics };
        const marked = markSuspectFigures(answer, all, records as unknown as SeriesMasterRecord[]);
        expect(flagsOfMarkedFigures(marked)).toEqual(figureFlags(marked, all));
      }),
      { numRuns: 500 },
    );
  });

  it('the figure summary counts and shows what the filters over every flagged figure gave', () => {
    const counts = fc.constantFrom(0, 3, FIGURES_SHOWN_AT_MOST, FIGURES_SHOWN_AT_MOST + 1, FIGURES_SHOWN_AT_MOST + 150);
    fc.assert(
      fc.property(counts, fc.array(figure, { minLength: 1, maxLength: 20 }), fc.array(finding, { maxLength: 6 }), (count, kinds, findings) => {
        const metrics = Array.from({ length: count }, (_, k) => kinds[k % kinds.length]);
        const all = findings.map(toFinding);
        const flagged = flagFigures(answerOf(metrics), all);
        const needsPerson = (f: FlaggedFigure) => f.value === null || f.flagged_by.length > 0;
        const complete = flagged.length <= FIGURES_SHOWN_AT_MOST;
        const summary = summarizeFigures(answerOf(metrics), figureFlags(answerOf(metrics), all), 'figures.csv');
        expect(JSON.stringify(summary, null, 1)).toBe(
          JSON.stringify(
            {
              as_of: '2026-11-30',
              methodology: DEFAULT_METHODOLOGY,
              computed: flagged.filter((f) => f.value !== null).length,
              not_computable: flagged.filter((f) => f.value === null).length,
              flagged: flagged.filter((f) => f.flagged_by.length > 0).length,
              shown: complete ? flagged : flagged.filter(needsPerson).slice(0, FIGURES_SHOWN_AT_MOST),
              complete,
              full_file: 'figures.csv',
            },
            null,
            1,
          ),
        );
      }),
      { numRuns: 60 },
    );
  });

  it("the day's CSV in pieces is the whole CSV, and a reconciliation line is csvLine's", () => {
    const result = fc.record(
      {
        series_id: fc.constantFrom('S1', '=S2', 'S"3'),
        window: fc.constantFrom('1y', '3y'),
        metric: fc.constantFrom('beta', '-x'),
        status: fc.constantFrom('match', 'breach', 'not_computable'),
        vendor: fc.oneof(cellNumber, fc.constant(null)),
        reason: fc.string({ unit: 'binary', maxLength: 10 }),
      },
      { requiredKeys: ['series_id', 'status'] },
    );
    fc.assert(
      fc.property(fc.array(result, { maxLength: 40 }), (results) => {
        const day = buildDailyReport({
          feed: 'f',
          previousAsOf: null,
          check: checkAnswer(20787, { read: 1, accepted: 1, rejected: 0 }, []),
          patterns: [],
          tickets: [],
          history: [],
          metrics: null,
          reconciliation: { results },
        });
        const whole = renderDailyCsv(day);
        expect([...dailyCsvInPieces(day)].join('')).toBe(whole);
        const plain = results.map((r) => csvLine(['reconciliation', r.status, null, r.metric ?? null, r.series_id, null, null, r.window ?? null, r.reason ?? null, r.vendor ?? null, null]));
        expect(whole).toBe([csvLine(DAILY_CSV_COLUMNS), ...plain].join('\n') + '\n');
      }),
      { numRuns: 200 },
    );
  });
});
