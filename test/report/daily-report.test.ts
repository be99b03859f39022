import { describe, expect, it } from 'vitest';
import type { MetricRow, MetricsAnswer } from '../../src/metrics/compute.js';
import { DEFAULT_METHODOLOGY } from '../../src/metrics/methodology.js';
import { checkAnswer } from '../../src/report/check-answer.js';
import { buildDailyReport, renderDailyHtml, renderDailyMarkdown, renderDailyTerminal } from '../../src/report/daily/index.js';
import { flagFigures } from '../../src/report/daily/figure-flags.js';
import { progressLine } from '../../src/cli/progress.js';
import { CAUTION } from '../../src/report/view.js';
import { spikeFinding } from './findings.js';

const finding = spikeFinding;
const figure = (window: string, metric: MetricRow['metric'] = 'beta', series = 'S1', value: number | null = 0.9): MetricRow => ({
  series_id: series,
  window,
  metric,
  value,
  observations: 12,
  ...(value === null && { reason: 'history too short' }),
});

describe('figures with an error-level finding in their window are marked', () => {
  // A 1y window at the month-end 2026-11-30 holds the months after 2025-11-30 (docs/methodology.md, windows).
  it('inside the window: marked; before it, or only a warning: not', () => {
    const findings = [finding('error', '2026-03-02'), finding('error', '2025-06-02', 'S2'), finding('warning', '2026-03-02', 'S3')];
    const metrics = [figure('1y'), figure('1y', 'beta', 'S2'), figure('3y', 'beta', 'S2'), figure('1y', 'beta', 'S3')];
    const flagged = flagFigures({ as_of: '2026-11-30', methodology: DEFAULT_METHODOLOGY, metrics }, findings);
    expect(flagged.map((f) => f.flagged_by.length > 0)).toEqual([true, false, true, false]);
    expect(flagged[0].flagged_by).toEqual(['spike_reversal|S1|2026-03-02']);
  });
});

function report(metrics: MetricRow[], extra: Partial<Parameters<typeof buildDailyReport>[0]> = {}) {
  const findings = [finding('error', '2026-03-02')];
  const answer: MetricsAnswer = { as_of: '2026-11-30', methodology: DEFAULT_METHODOLOGY, metrics };
  return buildDailyReport({
    feed: 'f',
    previousAsOf: '2026-11-27',
    check: checkAnswer(20787, { read: 10, accepted: 10, rejected: 0 }, findings),
    patterns: [],
    tickets: [],
    history: [],
    metrics: answer,
    ...extra,
  });
}

describe("the day's report", () => {
  it('a large run shows only the figures that need a person and links the full file', () => {
    const many = Array.from({ length: 500 }, (_, k) => figure('1y', 'beta', `X${k}`));
    const day = report([...many, figure('1y'), figure('3y', 'beta', 'X1', null)]);
    expect(day.figures!.complete).toBe(false);
    expect(day.figures!.shown.map((f) => `${f.series_id} ${f.window}`)).toEqual(['S1 1y', 'X1 3y']);
    const html = renderDailyHtml(day);
    expect(html).toContain('<a href="figures.csv">figures.csv</a>');
    expect(html).toContain('n/a: history too short');
    expect(html).toContain('0.9000 ⚑');
  });

  it('renders reconciliation when present: the tolerance chart, statuses, explanations and reasons', () => {
    const day = report([figure('1y')], {
      reconciliation: {
        results: [
          { series_id: 'S1', window: '3y', metric: 'std_dev', status: 'breach', vendor: 0.1412, computed: 0.1398, tolerance: 0.0005, explanations: [{ changes: { sd_denominator: 'population' }, computed: 0.1412 }] },
          { series_id: 'S2', window: '1y', metric: 'beta', status: 'match', vendor: 0.95, computed: 0.951, tolerance: 0.005 },
          { series_id: 'S3', window: '5y', metric: 'alpha', status: 'not_computable', reason: 'no benchmark level at 2021-11-30' },
        ],
      },
    });
    const html = renderDailyHtml(day);
    expect(html).toContain('id="reconciliation"');
    expect(html.match(/<circle class="figure"/g)).toHaveLength(2);
    expect(html).toContain('{&quot;sd_denominator&quot;:&quot;population&quot;}');
    expect(html).toContain('no benchmark level at 2021-11-30');
    expect(renderDailyMarkdown(day)).toContain('no benchmark level at 2021-11-30');
    expect(renderDailyHtml(report([figure('1y')]))).not.toContain('id="reconciliation"');
  });

  it('on a terminal: every line fits 80 columns, the caution once, no colour codes when colour is off', () => {
    const day = report([figure('1y'), figure('3y', 'beta', 'S1', null)]);
    const text = renderDailyTerminal(day, { colour: false }, ['a/very/long/path/'.repeat(10) + 'report.html']);
    for (const line of text.split('\n')) expect([...line].length, line).toBeLessThanOrEqual(80);
    expect(text.split(CAUTION.slice(0, 40)).length - 1).toBe(1);
    expect(text).not.toContain('\u001b[');
    expect(renderDailyTerminal(day, { colour: true })).toContain('\u001b[');
  });

  it('the progress line is written only to a terminal and never with --quiet', () => {
    let written = '';
    const stream = { isTTY: true, columns: 80, write: (text: string) => ((written += text), true) } as unknown as NodeJS.WriteStream;
    progressLine(false, stream).stage('reading');
    expect(written).toContain('navassay: reading');
    written = '';
    progressLine(true, stream).stage('reading');
    progressLine(false, { ...stream, isTTY: false } as unknown as NodeJS.WriteStream).stage('reading');
    expect(written).toBe('');
  });
});
