import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { readCsvBuffer, readWindowIntoSlot, settleLayout, windowArraysFor, windowRowsFor, estimateRows, type WindowRows } from '../../src/ingest/csv-reader.js';
import { readCsvOnTwoThreads } from '../../src/ingest/csv-ring.js';
import { readCsvSource } from '../../src/ingest/csv-source.js';
import { WindowStitcher } from '../../src/ingest/csv-stitch.js';
import type { FeedProfile } from '../../src/ingest/profile.js';
import type { FileKind } from '../../src/ingest/schema.js';
import type { IngestResult } from '../../src/ingest/table.js';
import { ANY_DATE_LIMITS, profile } from './helpers.js';

/**
 * A large CSV file is parsed on two threads through a ring of windows (src/ingest/csv-ring.ts):
 * each window, cut just after a line feed, is parsed on its own into columns of its own, and the
 * windows are joined in file order. Whatever the cuts, whichever thread parses which window and in
 * whatever order, the answer must be the one-thread reader's (`readCsvBuffer` on the whole file,
 * the plain implementation): every column, the dictionary and its order, the rejected rows with
 * their lines and reasons, the row counts, the errors, and the SHA-256 of the file's bytes.
 */
const dir = mkdtempSync(join(tmpdir(), 'navassay-ring-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const eol = fc.constantFrom('\n', '\n', '\r\n', '\r');

// NAV rows: the plain-row lane, with every kind of row it sends to the general path.
const navId = fc.constantFrom('NVA0001', 'NVA0002', ' NVA0003 ', '"NVA0004"', '"NVA\n0005"', 'NVA"6', '', 'NVA0007', 'NVA0008');
const navDate = fc.constantFrom('2026-11-27', '2026-11-30', '2026-02-30', '27/11/2026', ' 2026-11-26', '"2026-11-25"', '2026-1');
const navValue = fc.constantFrom('101.25', '-0.5', '1,234.5', '1.5e-3', '"7.25"', '"8.0', 'abc', '', '.5', '99');
const navRow = fc.oneof(
  { weight: 8, arbitrary: fc.tuple(navId, navDate, navValue).map((fields) => fields.join(',')) },
  { weight: 1, arbitrary: fc.tuple(navId, navDate).map((fields) => fields.join(',')) },
  { weight: 1, arbitrary: fc.constantFrom('', '   ', 'NVA0001,2026-11-27,1,extra', '"unclosed,2026-11-27,1', 'NVA0002,"2026-11-27\n",3') },
);
const navHeader = fc.constantFrom('series_id,date,nav', '\ufeffseries_id,date,nav', '"series_id","date","nav"', 'series_id;date;nav', '"series\nid",date,nav');

// Series master rows: text, boolean and optional date columns on the general path, and quoted
// free text that spans lines (a row that may run over a window's end).
const name = fc.constantFrom('Alpha Fund', '"Beta, Income"', '"Gamma\nTwo lines"', '"Delta ""quoted"""', '', '"Eps\r\nilon"', 'Zeta');
const masterRow = fc
  .tuple(
    fc.constantFrom('NVA0001', 'NVA0002', 'NVA0003', '', '"NVA0004"'),
    fc.constantFrom('BMK01', 'BMK02', '', '"BMK03"'),
    name,
    fc.constantFrom('yes', 'no', 'true', '', 'maybe', '1'),
    fc.constantFrom('2020-01-02', '', '2020-13-01', '02/01/2020'),
  )
  .map((fields) => fields.join(','));
const masterHeader = fc.constant('series_id,benchmark_id,name,stable_value,inception');

function csvText(header: fc.Arbitrary<string>, row: fc.Arbitrary<string>): fc.Arbitrary<string> {
  return fc
    .tuple(header, fc.array(fc.tuple(row, eol), { maxLength: 40 }), fc.boolean())
    .map(([top, rows, lastEol]) => top + '\n' + rows.map(([text, end], k) => text + (k < rows.length - 1 || lastEol ? end : '')).join(''));
}

const feedFile = fc.oneof(
  csvText(navHeader, navRow).map((text) => ({ text, kind: 'nav' as FileKind })),
  csvText(masterHeader, masterRow).map((text) => ({ text, kind: 'master' as FileKind })),
  fc.constantFrom({ text: 'series_id,date,nav\n', kind: 'nav' as FileKind }, { text: 'series_id,date,nav', kind: 'nav' as FileKind }),
);

const profiles = fc.constantFrom(profile({ date_format: 'auto' }), profile({ date_format: 'iso' }), profile({ date_format: 'day-first' }));

function outcome<T>(read: () => T): { value: T } | { error: string } {
  try {
    return { value: read() };
  } catch (error) {
    return { error: String(error) };
  }
}

/** Every position just after a line feed, where a window may end. */
function lineFeedEnds(bytes: Buffer, from: number): number[] {
  const ends: number[] = [];
  for (let at = bytes.indexOf(10, from); at >= 0; at = bytes.indexOf(10, at + 1)) ends.push(at + 1);
  return ends;
}

/**
 * Reads `bytes` as the ring does, one step at a time, with the choices made by `choose`: the
 * windows end at the chosen line feeds; at each step either a window in the ring (at most `slots`
 * windows past the last joined one) is parsed, on the "main thread" or on the "worker" (its rows
 * then cross as a message does, by structured clone), or the next parsed window is joined. Each
 * window is parsed into the arrays of its slot, as in the ring, each "thread" keeping its own
 * arrays per slot (grown when a window holds more rows than `slotRows`, or sized as the ring sizes
 * them when it is null). Answers null where the ring gives the file back to the one-thread reader.
 */
function readThroughWindows(
  bytes: Buffer,
  kind: FileKind,
  feedProfile: FeedProfile,
  cuts: number[],
  slots: number,
  slotRows: number | null,
  choose: (n: number) => number,
): IngestResult | null {
  // The ring settles the layout from its first slot, which holds the first window and the start
  // of the next (the bytes after its last line feed): here up to the second cut.
  const slotEnd = cuts[1] ?? bytes.length;
  const firstWindow = { bytes: bytes.subarray(0, slotEnd), final: slotEnd === bytes.length, totalBytes: bytes.length, moveOn: giveUp, takeAll: giveUp };
  let layout;
  try {
    layout = settleLayout(firstWindow, 'feed.csv', kind, feedProfile, ANY_DATE_LIMITS);
  } catch {
    return null;
  }
  const starts = [0, ...cuts];
  const ends = [...cuts, bytes.length];
  if (layout.firstRow > ends[0]) return null;
  const longest = Math.max(...ends.map((end, k) => end - starts[k]));
  const rows = slotRows ?? windowRowsFor(layout, bytes.subarray(0, ends[0]), longest);
  const arraysOfThread = [0, 1].map(() => Array.from({ length: slots }, () => windowArraysFor(layout, rows)));
  const stitcher = new WindowStitcher(layout, estimateRows(bytes, layout.headerStart, bytes.length));
  const parsed = new Map<number, WindowRows>();
  let joined = 0;
  while (joined < ends.length) {
    const open = [];
    for (let w = joined; w < Math.min(ends.length, joined + slots); w++) if (!parsed.has(w)) open.push(w);
    const canJoin = parsed.has(joined);
    const pick = choose(open.length + (canJoin ? 1 : 0));
    if (pick < open.length) {
      const w = open[pick];
      const window = Buffer.from(bytes.subarray(starts[w], ends[w]));
      const onWorker = choose(2) === 1;
      const start = w === 0 ? layout.firstRow : 0;
      const rows = readWindowIntoSlot(layout, window, start, w === 0 ? layout.firstLine : 1, w === ends.length - 1, arraysOfThread[onWorker ? 1 : 0], w % slots);
      parsed.set(w, onWorker ? structuredClone(rows) : rows);
      continue;
    }
    const rows = parsed.get(joined)!;
    if (rows.spilled) return null;
    stitcher.append(rows);
    parsed.delete(joined);
    joined++;
  }
  return stitcher.finish();
}

/**
 * Writes a NAV file (ISO dates), reads it on two threads through windows of `windowBytes` and on
 * one, expects the two-thread path taken and the same answer, and returns the one-thread answer.
 */
function expectTwoThreadsAsOne(file: string, text: string, windowBytes: number) {
  const path = join(dir, file);
  writeFileSync(path, text);
  const feedProfile = profile({ date_format: 'iso' });
  const read = readCsvOnTwoThreads(path, 'nav', feedProfile, ANY_DATE_LIMITS, windowBytes, 0);
  expect(read).not.toBeNull();
  const whole = readCsvBuffer(Buffer.from(text), path, 'nav', feedProfile, ANY_DATE_LIMITS);
  expect(read!.result).toStrictEqual(whole);
  return whole;
}

function giveUp(): never {
  throw new Error('the first window does not settle the layout');
}

describe('a CSV file parsed window by window on two threads gives what the one-thread reader gives', () => {
  it('for any cuts at line feeds, any assignment of windows to threads and any order of parsing', () => {
    let joinedRuns = 0;
    // The slots' arrays: sized as the ring sizes them, or for a few rows (windows of more rows grow them).
    const slotRows = fc.option(fc.integer({ min: 1, max: 6 }), { nil: null });
    fc.assert(
      fc.property(feedFile, profiles, fc.array(fc.boolean(), { minLength: 1, maxLength: 48 }), fc.integer({ min: 1, max: 4 }), slotRows, fc.infiniteStream(fc.nat()), ({ text, kind }, feedProfile, cutAt, slots, rows, stream) => {
        const bytes = Buffer.from(text, 'utf8');
        // The window ends: any subset of the line feeds (all of them for the files of up to 48 lines).
        const cuts = lineFeedEnds(bytes, 0).filter((_, k) => cutAt[k % cutAt.length]);
        const choices = stream[Symbol.iterator]();
        const choose = (n: number) => (choices.next().value as number) % n;
        const whole = outcome(() => readCsvBuffer(bytes, 'feed.csv', kind, feedProfile, ANY_DATE_LIMITS));
        const windowed = outcome(() => readThroughWindows(bytes, kind, feedProfile, cuts.filter((cut) => cut < bytes.length), slots, rows, choose));
        if ('value' in windowed && windowed.value !== null) {
          joinedRuns++;
          expect(windowed.value).toStrictEqual((whole as { value: IngestResult }).value);
        }
        // A file without quotes never runs over a window's end, so it is given back only when its
        // first window does not settle an automatic date order (as the one-thread reader, which then reads it whole).
        if (!text.includes('"') && feedProfile.date_format !== 'auto' && 'value' in whole) expect(windowed).not.toEqual({ value: null });
      }),
      { numRuns: 3000 },
    );
    // Most files are joined from windows, not given back (the comparison above is not vacuous).
    expect(joinedRuns).toBeGreaterThan(1500);
  });
});

describe('the rows a slot of the ring is sized for', () => {
  const layout = settleLayout({ bytes: Buffer.from('series_id,date,nav\n'), final: true, totalBytes: 19, moveOn: giveUp, takeAll: giveUp }, 'feed.csv', 'nav', profile(), ANY_DATE_LIMITS);
  const lines = (count: number, line: string) => Buffer.from('series_id,date,nav\n' + `${line}\n`.repeat(count));

  it('are the first window\'s rows scaled to a whole window, with a quarter and 1,024 rows to spare', () => {
    // 1,000 lines of 30 bytes (29 and the line feed) in the first window; windows of 3 MB.
    expect(windowRowsFor(layout, lines(1000, 'NVA00001,2026-11-27,101.25000'), 3_000_000)).toBe(Math.ceil((3_000_000 / 30) * 1.25) + 1024);
  });

  it('are never more than a window can hold, a byte per field, nor the most when the first window has no line end', () => {
    expect(windowRowsFor(layout, lines(1000, ',,'), 3_000)).toBe(1001);
    expect(windowRowsFor(layout, Buffer.from('series_id,date,nav\nNVA1,2026-11-27,1'), 3_000)).toBe(1001);
  });
});

describe('reading a file on two threads (a worker and the main thread, through the ring)', () => {
  let fileNumber = 0;
  const cases = fc.tuple(feedFile, profiles, fc.integer({ min: 16, max: 120 }));

  it('gives the one-thread answer and the SHA-256 of the bytes, or the same error', () => {
    fc.assert(
      fc.property(cases, ([{ text, kind }, feedProfile, windowBytes]) => {
        const path = join(dir, `feed-${fileNumber++}.csv`);
        const bytes = Buffer.from(text, 'utf8');
        writeFileSync(path, bytes);
        const whole = outcome(() => readCsvBuffer(bytes, path, kind, feedProfile, ANY_DATE_LIMITS));
        // Every file from 0 bytes on takes the two-thread path here (hashed on the hashing thread).
        const read = outcome(() => readCsvSource(path, kind, feedProfile, ANY_DATE_LIMITS, windowBytes, 0, 0));
        if ('error' in whole) {
          expect(read).toEqual(whole);
          return;
        }
        expect('value' in read).toBe(true);
        const { result, sha256 } = (read as { value: ReturnType<typeof readCsvSource> }).value;
        expect(sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
        expect(result).toStrictEqual(whole.value);
      }),
      { numRuns: 40 },
    );
  });

  it('takes the two-thread path for a plain file of many windows', () => {
    // 3,000 rows through 64-byte windows: some 1,300 windows.
    const rows = Array.from({ length: 3000 }, (_, k) => `NVA${String(k % 41).padStart(4, '0')},2026-${String(1 + (k % 12)).padStart(2, '0')}-1${k % 10},${(k * 0.37).toFixed(2)}`);
    const text = ['series_id,date,nav', ...rows.slice(0, 1500), 'NVA0001,2026-02-30,1', ...rows.slice(1500)].join('\n') + '\n';
    const whole = expectTwoThreadsAsOne('plain.csv', text, 64);
    // The expected values, from the text above: 3,001 data rows, the bad date on line 1,502.
    expect(whole.rows).toEqual({ read: 3001, accepted: 3000, rejected: 1 });
    expect(whole.rejected[0].line).toBe(1502);
    expect(whole.table.lines[2999]).toBe(3002);
  });

  it('grows the arrays of windows fuller of rows than the first, and keeps the grown ones for the slot', () => {
    // The first 64 KiB window holds 300 lines of some 220 bytes, so the slots are sized for some
    // 1,400 rows; the windows after it hold some 4,000 lines of 16 bytes.
    const longId = (k: number) => `NVA${String(k).padStart(4, '0')}${'X'.repeat(200)}`;
    const long = Array.from({ length: 300 }, (_, k) => `${longId(k % 7)},2026-11-${String(1 + (k % 28)).padStart(2, '0')},${k}.25`);
    const short = Array.from({ length: 30_000 }, (_, k) => `N${k % 9},2026-10-${String(1 + (k % 28)).padStart(2, '0')},${k % 97}`);
    const text = ['series_id,date,nav', ...long, ...short.slice(0, 20_000), 'N1,2026-02-30,1', ...short.slice(20_000)].join('\n') + '\n';
    const firstWindow = Buffer.from(text).subarray(0, 65536);
    const layout = settleLayout({ bytes: firstWindow, final: false, totalBytes: text.length, moveOn: giveUp, takeAll: giveUp }, 'short-lines.csv', 'nav', profile({ date_format: 'iso' }), ANY_DATE_LIMITS);
    const sized = windowRowsFor(layout, firstWindow, 65536);
    expect(sized).toBeGreaterThan(1200);
    expect(sized).toBeLessThan(1600);
    const whole = expectTwoThreadsAsOne('short-lines.csv', text, 65536);
    expect(whole.rows).toEqual({ read: 30_301, accepted: 30_300, rejected: 1 });
    expect(whole.rejected[0].line).toBe(20_302);
  });

  it('gives a file whose quoted field runs over a window end back to the one-thread reader, with the same answer', () => {
    const row = 'NVA0001,BMK01,"a name\nover\nthree lines",yes,2020-01-02\n';
    // The first window (80 bytes) ends just after "over": inside the quoted name.
    const text = 'series_id,benchmark_id,name,stable_value,inception\n' + row.repeat(20);
    const path = join(dir, 'spans.csv');
    writeFileSync(path, text);
    expect(readCsvOnTwoThreads(path, 'master', profile(), ANY_DATE_LIMITS, 80, 0)).toBeNull();
    const { result } = readCsvSource(path, 'master', profile(), ANY_DATE_LIMITS, 80, 0, 0);
    expect(result).toStrictEqual(readCsvBuffer(Buffer.from(text), path, 'master', profile(), ANY_DATE_LIMITS));
    expect(result.rows.accepted).toBe(20);
  });
});
