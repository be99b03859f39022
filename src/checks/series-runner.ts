/**
 * The series-level checks: every enabled series check over a range of series of the NAV frame,
 * with the series' context and the move analysis built once per series. The plain runner
 * (src/checks/run.ts) runs it over every series; worker threads (src/checks/check-worker.ts)
 * over the ranges they take. Free of the settings schema, which a worker does not need.
 */
import type { Finding } from '../findings.js';
import type { CorporateActionRecord } from '../ingest/records.js';
import { findDatedSeries, findSeries, seriesAt } from '../series/frame.js';
import type { SeriesCheck, SeriesContext } from './check.js';
import { analyseMoves, type ClaimingParams } from './move-analysis.js';
import { CHECKS } from './registry.js';
import { FrameTables } from './series-tables.js';
import { MoveScratch } from './residual-moves.js';
import type { CheckInput } from './run.js';
import type { ResolvedCheck, SettingsResolver } from './settings-resolver.js';

/**
 * The series-level checks over series `first` to `end − 1` of the NAV frame, unsorted.
 * `feedLatest` is the whole feed's, not the range's.
 */
export function runSeriesChecks(input: CheckInput, resolver: SettingsResolver, first: number, end: number, feedLatest: number | undefined): Finding[] {
  return seriesChecker(input, resolver, feedLatest)(first, end);
}

/**
 * The series-level checks, prepared once (the catalogue, the master and the actions by series)
 * and then run over any range of series `first` to `end − 1`, unsorted: a worker thread runs
 * many ranges with one.
 */
export function seriesChecker(input: CheckInput, resolver: SettingsResolver, feedLatest: number | undefined): (first: number, end: number) => Finding[] {
  const seriesChecks = CHECKS.filter((check): check is SeriesCheck => check.scope === 'series');
  const masterById = new Map((input.master ?? []).map((record) => [record.series_id, record]));
  const actionsById = groupActions(input.actions ?? []);
  const benchmarkTables = input.benchmarks && new FrameTables(input.benchmarks);
  // Each series' model is built in these buffers: it is read only while its series' checks run.
  const scratch = new MoveScratch();

  return (first, end) => {
    const findings: Finding[] = [];
    for (let i = first; i < end; i++) {
      const series = seriesAt(input.nav, i);
      const master = masterById.get(series.id);
      const base: SeriesContext = {
        asOf: input.asOf,
        calendars: input.calendars,
        master,
        benchmark: master?.benchmark_id && input.benchmarks ? findSeries(input.benchmarks, master.benchmark_id) : undefined,
        benchmarks: input.benchmarks,
        benchmarkTables,
        actions: actionsById.get(series.id) ?? [],
        previous: input.previous ? findDatedSeries(input.previous, series.id) : undefined,
        feedLatest,
      };
      const resolved = seriesChecks.map((check) => resolver.resolve(check, master?.category, series.id));
      const readsMoves = seriesChecks.some((check, c) => check.readsMoves && resolved[c].enabled);
      const context = readsMoves ? { ...base, moves: analyseMoves(series, base, claimingParams(seriesChecks, resolved), scratch) } : base;
      for (let c = 0; c < seriesChecks.length; c++) {
        if (!resolved[c].enabled) continue;
        // Most checks find nothing in most series: their empty lists are not spread into a call.
        const found = seriesChecks[c].run(series, context, resolved[c].params);
        for (const finding of found) findings.push(finding);
      }
    }
    return findings;
  };
}

/** The series' resolved parameters of the checks that claim steps from others, when enabled. */
function claimingParams(checks: readonly SeriesCheck[], resolved: readonly ResolvedCheck[]): ClaimingParams {
  const claiming: Record<string, unknown> = {};
  checks.forEach((check, c) => {
    if (resolved[c].enabled && (check.id === 'date_shift' || check.id === 'split_like_jump' || check.id === 'spike_reversal')) claiming[check.id] = resolved[c].params;
  });
  return claiming as ClaimingParams;
}

/** Corporate actions by series, each list by ex-date. */
function groupActions(actions: readonly CorporateActionRecord[]): Map<string, CorporateActionRecord[]> {
  const byId = new Map<string, CorporateActionRecord[]>();
  for (const action of actions) {
    const list = byId.get(action.series_id);
    if (list) list.push(action);
    else byId.set(action.series_id, [action]);
  }
  for (const list of byId.values()) list.sort((a, b) => a.ex_date - b.ex_date);
  return byId;
}

/**
 * The number of the next range of series nobody has claimed yet, from a counter on shared memory
 * that every thread of the parallel runner reads and advances at once (src/checks/parallel.ts);
 * numbers past the last range mean none is left.
 */
export function claimRange(claims: Int32Array): number {
  return Atomics.add(claims, 0, 1);
}
