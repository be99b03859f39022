/**
 * Speed never changes answers: the check runner on worker threads gives the same findings, in
 * the same order, as the plain runner on this thread — on the demo feed and on both
 * fault-planting generators (the recall/precision tests score the plain runner against the
 * planted faults, so equality here carries their scores over to the fast path).
 */
import { writeFiles } from '../cli/run-cli.js';
import { describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { generateUniverse } from '../../fixtures/universe/generate.js';
import { generateAltUniverse } from '../../fixtures/universe-alt/generate.js';
import { runChecks } from '../../src/checks/run.js';
import { runChecksInParallel, seriesRanges } from '../../src/checks/parallel.js';
import { CheckWorkers, checkWorkersAhead, NAV_BYTES_FOR_WORKERS_AHEAD } from '../../src/checks/check-workers.js';
import { DEMO_AS_OF, DEMO_PREVIOUS_AS_OF, demoFiles } from '../../src/demo/scenario.js';
import { loadFeed } from '../../src/ingest/feed.js';
import { FeedProfileSchema } from '../../src/ingest/profile.js';
import { readCsvFile } from '../../src/ingest/csv-source.js';
import { writeArrowIpc } from '../../src/ingest/arrow-table.js';
import { isSharedFrame, sharedFrame, type SeriesFrame } from '../../src/series/frame.js';

describe('checks on worker threads', () => {
  it('cut the series into disjoint ranges that cover every series once, in order', () => {
    const universe = generateUniverse({ seed: 41, funds: 37, faultsPerKind: 0 });
    for (const threads of [1, 2, 3, 7]) {
      const ranges = seriesRanges(universe.nav, threads);
      expect(ranges[0][0]).toBe(0);
      expect(ranges[ranges.length - 1][1]).toBe(universe.nav.ids.length);
      for (let r = 1; r < ranges.length; r++) expect(ranges[r][0]).toBe(ranges[r - 1][1]);
      for (const [first, end] of ranges) expect(end).toBeGreaterThan(first);
    }
  });

  it('find exactly what the plain runner finds on both generators', async () => {
    const cases = [
      { universe: generateUniverse({ seed: 2001 }), threads: 2 },
      { universe: generateUniverse({ seed: 2002, tails: 4 }), threads: 3 },
      { universe: generateAltUniverse({ seed: 3001 }), threads: 2 },
    ];
    for (const { universe, threads } of cases) {
      const plain = runChecks(universe);
      expect(plain.length).toBeGreaterThan(10); // the planted faults are there to be found
      expect(await runChecksInParallel(universe, {}, { threads, minRows: 0 })).toEqual(plain);
    }
  });

  it('find the same whichever thread claims which range: a caller busy beside the checks, more threads than cores', async () => {
    const universe = generateUniverse({ seed: 2005, funds: 60 });
    const plain = runChecks(universe);
    // The daily job computes the figures on this thread beside the checks: the workers claim
    // the first ranges and this thread only those left when it is free.
    const checking = runChecksInParallel(universe, {}, { threads: 2, minRows: 0 });
    const until = Date.now() + 300;
    while (Date.now() < until) {
      // busy, as the figures keep this thread
    }
    expect(await checking).toEqual(plain);
    expect(await runChecksInParallel(universe, {}, { threads: 5, minRows: 0 })).toEqual(plain);
  });

  it('find the same with workers started ahead of the checks, fewer or more of them than needed', async () => {
    const universe = generateUniverse({ seed: 2006, funds: 40 });
    const plain = runChecks(universe);
    for (const [ahead, threads] of [
      [1, 2],
      [1, 3],
      [2, 2],
    ]) {
      const workers = new CheckWorkers(ahead);
      // Started ahead, they wait for their job while this thread is busy elsewhere (the reading).
      await new Promise((resolve) => setTimeout(resolve, 50));
      expect(await runChecksInParallel(universe, {}, { threads, minRows: 0, workers })).toEqual(plain);
      // The workers started ahead were taken first; whatever no job took is ended.
      expect(waiting(workers)).toBe(Math.max(0, ahead - (threads - 1)));
      workers.release();
      expect(waiting(workers)).toBe(0);
    }
  });

  it('start workers ahead only for a NAV file large enough to need them, and only with more than one thread', () => {
    const dir = mkdtempSync(join(tmpdir(), 'navassay-ahead-'));
    const small = join(dir, 'small.csv');
    const large = join(dir, 'large.csv');
    writeFileSync(small, 'series_id,date,nav\n');
    writeFileSync(large, Buffer.alloc(NAV_BYTES_FOR_WORKERS_AHEAD));
    for (const [path, threads, expected] of [
      [small, 2, 0],
      [large, 1, 0],
      [large, 2, 1],
      [large, 4, 3],
      [join(dir, 'absent.csv'), 2, 0],
      [undefined, 2, 0],
    ] as const) {
      const workers = checkWorkersAhead(path, threads);
      expect(waiting(workers)).toBe(expected);
      workers.release();
    }
  });

  it('apply per-category and per-series settings in the workers as on one thread', async () => {
    const universe = generateUniverse({ seed: 2003 });
    const someSeries = universe.nav.ids[5];
    const settings = { run: { stale_value: { min_days: 4 } }, series: { [someSeries]: { missing_dates: { enabled: false } } } };
    expect(await runChecksInParallel(universe, settings, { threads: 2, minRows: 0 })).toEqual(runChecks(universe, settings));
  });

  it('find exactly what the plain runner finds on the demo feed, with its previous snapshot', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'navassay-parallel-'));
    writeFiles(dir, demoFiles());
    const indexVendor = FeedProfileSchema.parse({ columns: { benchmark_id: 'Index Code', date: 'Value Date', level: 'Close' }, delimiter: ';', decimal: ',', date_format: 'day-first' });
    const at = (name: string) => join(dir, name);
    const feed = await loadFeed(
      { nav: at('nav.csv'), benchmarks: at('benchmarks.csv'), master: at('master.csv'), rates: at('rates.csv'), holidays: at('holidays.csv'), actions: at('actions.csv'), vendor: at('vendor-figures.csv') },
      { profiles: { benchmarks: indexVendor } },
    );
    const previous = (await loadFeed({ nav: at('nav-previous.csv') })).nav;
    expect(DEMO_PREVIOUS_AS_OF).toBeLessThan(DEMO_AS_OF);
    const input = { ...feed, previous, asOf: DEMO_AS_OF };
    const plain = runChecks(input);
    expect(plain.some((f) => f.check === 'restated_value')).toBe(true); // the previous snapshot reached the workers' checks
    expect(await runChecksInParallel(input, {}, { threads: 2, minRows: 0 })).toEqual(plain);
  });

  it('give the same findings whether the frames are read onto shared memory or copied there once', async () => {
    const universe = generateUniverse({ seed: 2004 });
    // A caller's own arrays, copied once onto shared memory for every worker.
    const ordinary = { ...universe, nav: ordinaryFrame(universe.nav), benchmarks: universe.benchmarks && ordinaryFrame(universe.benchmarks) };
    expect(isSharedFrame(ordinary.nav)).toBe(false);
    expect(isSharedFrame(universe.nav)).toBe(true);
    const plain = runChecks(ordinary);
    expect(runChecks(universe)).toEqual(plain);
    expect(await runChecksInParallel(ordinary, {}, { threads: 2, minRows: 0 })).toEqual(plain);
    expect(await runChecksInParallel(universe, {}, { threads: 3, minRows: 0 })).toEqual(plain);
  });

  it('receive the frames read from CSV and from Arrow as they are, on shared memory, and find what the plain runner finds', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'navassay-shared-'));
    writeFiles(dir, demoFiles());
    const at = (name: string) => join(dir, name);
    const profile = FeedProfileSchema.parse({});
    writeArrowIpc(readCsvFile(at('nav.csv'), 'nav', profile).table, at('nav.arrow'));
    writeArrowIpc(readCsvFile(at('nav-previous.csv'), 'nav', profile).table, at('nav-previous.arrow'));
    const others = { master: at('master.csv'), rates: at('rates.csv'), holidays: at('holidays.csv'), actions: at('actions.csv') };
    for (const extension of ['csv', 'arrow']) {
      const feed = await loadFeed({ nav: at(`nav.${extension}`), ...others });
      const previous = (await loadFeed({ nav: at(`nav-previous.${extension}`) })).nav;
      expect(isSharedFrame(feed.nav)).toBe(true);
      expect(isSharedFrame(feed.rates!)).toBe(true);
      expect(isSharedFrame(previous)).toBe(true);
      expect(sharedFrame(feed.nav)).toBe(feed.nav);
      const input = { ...feed, previous, asOf: DEMO_AS_OF };
      const plain = runChecks(input);
      expect(plain.some((f) => f.check === 'restated_value')).toBe(true);
      expect(await runChecksInParallel(input, {}, { threads: 2, minRows: 0 })).toEqual(plain);
    }
  });
});

/** How many workers started ahead still wait for a job. */
function waiting(workers: CheckWorkers): number {
  return (workers as unknown as { waiting: unknown[] }).waiting.length;
}

/** The frame's rows in ordinary arrays, as a library caller might hand them in. */
function ordinaryFrame(frame: SeriesFrame): SeriesFrame {
  return { ...frame, offsets: frame.offsets.slice(), dates: frame.dates.slice(), values: frame.values.slice(), lines: frame.lines.slice() };
}
