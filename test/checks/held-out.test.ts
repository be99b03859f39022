/**
 * Recall and precision of every check on a second, independently written universe
 * (`fixtures/universe-alt/generate.ts`): other return models (GARCH market, fat-tailed funds,
 * a crash day), other calendars, a benchmark with its own holidays, 2- and 4-decimal NAVs,
 * funds that start late or close, and faults planted the way feeds break. Scored with the
 * same rules as `recall-precision.test.ts` (`fixtures/universe/score.ts`): a finding is real
 * when it names the planted series (or unreadable line) and overlaps the fault's dates within
 * a week; `info` findings are explanations, not alarms, and are left out of both measures.
 *
 * One deviation in the ground truth, not in the scoring: a row moved into the future by a
 * mistyped year leaves its own date empty, so that planting records two faults (a
 * `future_date` on the new date and a `missing_dates` on the old one), and a future row that
 * lands on a weekend also rightly counts for `off_calendar_date`.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it, vi } from 'vitest';
import { generateAltUniverse, type AltUniverse } from '../../fixtures/universe-alt/generate.js';
import { poolScores, scoreTable } from '../../fixtures/universe/score.js';
import { formatIsoDate } from '../../src/calendar/days.js';
import { runChecks } from '../../src/checks/run.js';
import { CHECK_IDS } from '../../src/checks/registry.js';
import { main } from '../../src/cli/main.js';
import type { Finding } from '../../src/findings.js';
import type { SeriesFrame } from '../../src/series/frame.js';

/** The generated universes carry no vendor file; vendor_inconsistent is proven by its own unit tests. */
const FEED_CHECK_IDS = CHECK_IDS.filter((id) => id !== 'vendor_inconsistent');

const SEEDS = [11, 22, 33, 44, 55, 66];

const runs: Array<{ universe: AltUniverse; findings: Finding[] }> = SEEDS.map((seed) => {
  const universe = generateAltUniverse({ seed });
  return { universe, findings: runChecks(universe) };
});


describe(`recall and precision on the held-out-style universe (seeds ${SEEDS.join(', ')})`, () => {
  const pooled = poolScores(runs);
  console.table(scoreTable(pooled));

  it('plants every kind of fault the catalogue looks for, at least 20 of each', () => {
    for (const id of FEED_CHECK_IDS) expect(pooled.get(id)?.planted ?? 0, id).toBeGreaterThanOrEqual(20);
  });

  it.each(FEED_CHECK_IDS.map((id) => [id]))('%s finds at least 95 % of its planted faults, and at least 95 % of its alarms are real', (id) => {
    const score = pooled.get(id)!;
    expect(score.found / score.planted, `${id} recall`).toBeGreaterThanOrEqual(0.95);
    expect(score.real / score.findings, `${id} precision`).toBeGreaterThanOrEqual(0.95);
  });

  it('explains announced splits and distributions instead of raising alarms', () => {
    let events = 0;
    for (const { universe, findings } of runs) {
      for (const event of universe.legitimate.filter((e) => e.kind === 'announced_split' || e.kind === 'announced_distribution')) {
        events++;
        const alarms = findings.filter((f) => f.series_id === event.series_id && f.start === event.date && f.severity !== 'info');
        expect(alarms, `${event.kind} ${event.series_id} ${event.date}`).toEqual([]);
      }
    }
    expect(events).toBe(SEEDS.length * 8);
  });

  it('raises nothing on money-market funds, accruing or stable, that carry no planted fault', () => {
    for (const { universe, findings } of runs) {
      const faulted = new Set(universe.faults.map((f) => f.series_id));
      for (const event of universe.legitimate.filter((e) => (e.kind === 'accruing_money_market' || e.kind === 'stable_nav') && !faulted.has(e.series_id))) {
        expect(findings.filter((f) => f.series_id === event.series_id), `${event.kind} ${event.series_id}`).toEqual([]);
      }
    }
  });

  it('reports a fund that closed months ago as info only, never as an alarm', () => {
    for (const { universe, findings } of runs) {
      const closed = universe.legitimate.find((e) => e.kind === 'fund_closed')!;
      const late = findings.filter((f) => f.series_id === closed.series_id && f.check === 'late_series');
      expect(late.map((f) => [f.severity, f.evidence.looks_closed])).toEqual([['info', true]]);
    }
  });

  it('raises no alarm on the crash day for funds without a fault there', () => {
    for (const { universe, findings } of runs) {
      const crash = universe.legitimate.find((e) => e.kind === 'market_crash')!.date!;
      const faulted = new Set(universe.faults.map((f) => f.series_id));
      const alarms = findings.filter((f) => f.start === crash && f.severity !== 'info' && !faulted.has(f.series_id));
      expect(alarms, crash).toEqual([]);
    }
  });
});

// ── the command line on files written from one universe ──────────────────────────────────

function csvOfFrame(frame: SeriesFrame, header: string): string {
  // Rows in line order, so that each row sits on the line the in-memory frame cites.
  const rows: string[] = [];
  for (let s = 0; s < frame.ids.length; s++) {
    for (let r = frame.offsets[s]; r < frame.offsets[s + 1]; r++) rows[frame.lines[r] - 2] = `${frame.ids[s]},${formatIsoDate(frame.dates[r])},${frame.values[r]}`;
  }
  return `${header}\n${rows.join('\n')}\n`;
}

describe('navassay check on files written from the alternative universe', () => {
  it('gives exactly the findings runChecks gives on the same data', async () => {
    const universe = generateAltUniverse({ seed: SEEDS[0] });
    const dir = mkdtempSync(join(tmpdir(), 'navassay-alt-'));
    const text = (value: string | null) => value ?? '';
    writeFileSync(join(dir, 'nav.csv'), csvOfFrame(universe.nav, 'series_id,date,nav'));
    writeFileSync(join(dir, 'previous.csv'), csvOfFrame(universe.previous, 'series_id,date,nav'));
    writeFileSync(join(dir, 'benchmarks.csv'), csvOfFrame(universe.benchmarks, 'benchmark_id,date,level'));
    writeFileSync(
      join(dir, 'master.csv'),
      ['series_id,benchmark_id,name,category,currency,calendar,stable_value']
        .concat(universe.master.map((m) => [m.series_id, text(m.benchmark_id), text(m.name), text(m.category), text(m.currency), text(m.calendar), m.stable_value].join(',')))
        .join('\n') + '\n',
    );
    writeFileSync(join(dir, 'holidays.csv'), ['calendar,date'].concat(universe.holidays.map(([c, d]) => `${c},${formatIsoDate(d)}`)).join('\n') + '\n');
    writeFileSync(
      join(dir, 'actions.csv'),
      ['series_id,ex_date,kind,value'].concat(universe.actions.map((a) => `${a.series_id},${formatIsoDate(a.ex_date)},${a.kind},${a.value}`)).join('\n') + '\n',
    );
    let stdout = '';
    const out = vi.spyOn(process.stdout, 'write').mockImplementation((chunk: string | Uint8Array) => {
      stdout += String(chunk);
      return true;
    });
    let status: number;
    try {
      status = await main([
        'check', '--nav', join(dir, 'nav.csv'), '--benchmarks', join(dir, 'benchmarks.csv'), '--master', join(dir, 'master.csv'),
        '--holidays', join(dir, 'holidays.csv'), '--actions', join(dir, 'actions.csv'), '--previous', join(dir, 'previous.csv'),
        '--as-of', formatIsoDate(universe.asOf), '--format', 'json',
      ]);
    } finally {
      out.mockRestore();
    }
    // The unreadable rows of the universe are synthetic (no file holds them), so they are left
    // out of the in-memory run too; everything else is the same input.
    const expected = runChecks({ ...universe, rejected: [] });
    const answer = JSON.parse(stdout);
    expect(status).toBe(1);
    expect(answer.as_of).toBe('2026-10-14');
    expect(answer.rows.rejected).toBe(0);
    expect(answer.findings).toEqual(JSON.parse(JSON.stringify(expected)));
    expect(answer.findings.length).toBeGreaterThan(60);
  });
});
