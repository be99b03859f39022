/**
 * Speed never changes answers: the series runner builds each series' residual model in reused
 * buffers (`MoveScratch`) instead of fresh arrays. A model built in the scratch must equal the
 * model built fresh, whatever series came before it (a longer one leaves old values past the
 * new series' end, a shorter one makes the buffers grow), and the runner must find for each
 * series exactly what it finds for that series alone.
 */
import { describe, expect, it } from 'vitest';
import { generateUniverse } from '../../fixtures/universe/generate.js';
import { generateAltUniverse } from '../../fixtures/universe-alt/generate.js';
import { MoveScratch, residualMoves, type ResidualMoves } from '../../src/checks/residual-moves.js';
import { compareFindings, latestDateUpTo, seriesChecker, type CheckInput } from '../../src/checks/run.js';
import { parseCheckSettings, SettingsResolver } from '../../src/checks/settings.js';
import { seriesAt } from '../../src/series/frame.js';
import type { Finding } from '../../src/findings.js';
import { contextFor, frameOfArrays, trackingPair } from './helpers.js';

/** The model as plain values, copied out while it is valid. */
function snapshot(model: ResidualMoves) {
  const { from, to, raw, fund, bench, benchFrom, benchTo, span, residual, z, tail, ...scalars } = model;
  const plain = (values: ArrayLike<number>) => Array.from(values);
  return {
    ...scalars,
    arrays: [from, to, raw, fund, bench, benchFrom, benchTo, span, residual, z].map(plain),
    tail: { count: tail.count, from: tail.from, values: plain(tail.values) },
  };
}

/** Series of several lengths, with and without a benchmark, one with benchmark holidays. */
function mixedSeries() {
  const cases = [];
  for (const [seed, count, withBenchmark, holidays] of [
    [1, 400, true, false],
    [2, 60, true, true],
    [3, 900, false, false],
    [4, 5, true, false],
    [5, 250, true, true],
    [6, 1, true, false],
    [7, 1200, true, false],
  ] as const) {
    const { dates, fund, bench } = trackingPair(seed, count);
    // Every seventh benchmark day missing: steps the benchmark cannot price.
    const benchDates = holidays ? dates.filter((_, i) => i % 7 !== 3) : dates;
    const benchValues = holidays ? bench.filter((_, i) => i % 7 !== 3) : bench;
    const benchmarks = frameOfArrays([{ id: 'BM1', dates: benchDates, values: benchValues }]);
    const series = seriesAt(frameOfArrays([{ id: `F${seed}`, dates, values: fund }]), 0);
    const context = contextFor({ asOf: dates[dates.length - 1], benchmark: withBenchmark ? seriesAt(benchmarks, 0) : undefined, benchmarks });
    cases.push({ series, context });
  }
  return cases;
}

describe('the residual model in reused buffers', () => {
  it('equals the model built in fresh arrays, in any order of series', () => {
    const cases = mixedSeries();
    const fresh = cases.map(({ series, context }) => snapshot(residualMoves(series, context)));
    const orders = [
      cases.map((_, i) => i),
      cases.map((_, i) => cases.length - 1 - i),
      [...cases.keys()].sort((a, b) => cases[b].series.dates.length - cases[a].series.dates.length),
      [...cases.keys()].sort((a, b) => cases[a].series.dates.length - cases[b].series.dates.length),
    ];
    for (const order of orders) {
      const scratch = new MoveScratch();
      for (const i of [...order, ...order]) expect(snapshot(residualMoves(cases[i].series, cases[i].context, scratch))).toEqual(fresh[i]);
    }
  });

  it('gives each series the findings it has when checked alone, long series before short and after', () => {
    for (const input of [generateUniverse({ seed: 2004, funds: 40 }), generateAltUniverse({ seed: 3002 })] as CheckInput[]) {
      const resolver = new SettingsResolver(parseCheckSettings({}));
      const feedLatest = latestDateUpTo(input.nav, input.asOf);
      const n = input.nav.ids.length;
      const rows = (i: number) => input.nav.offsets[i + 1] - input.nav.offsets[i];
      // Each series with a checker of its own: its model built in buffers no other series touched.
      const alone = [...Array(n).keys()].map((i) => seriesChecker(input, resolver, feedLatest)(i, i + 1));
      const longFirst = [...Array(n).keys()].sort((a, b) => rows(b) - rows(a) || a - b);
      for (const order of [longFirst, [...longFirst].reverse()]) {
        const shared = seriesChecker(input, resolver, feedLatest);
        const found: Finding[] = [];
        for (const i of order) {
          const findings = shared(i, i + 1);
          expect(findings).toEqual(alone[i]);
          found.push(...findings);
        }
        expect(found.sort(compareFindings)).toEqual(alone.flat().sort(compareFindings));
      }
      expect(alone.flat().length).toBeGreaterThan(10); // the planted faults are there to be found
    }
  });
});
