import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { BackgroundHash } from '../../src/ingest/background-hash.js';
import { DateDay, Dictionary, Float64, Int32, makeData, makeVector, Table, tableToIPC, Utf8, vectorFromArray } from 'apache-arrow';
import { BACKGROUND_HASH_BYTES, FileWindow } from '../../src/ingest/csv-window.js';
import { readInputFile } from '../../src/ingest/input-file.js';
import { DEFAULT_PROFILE } from '../../src/ingest/profile.js';
import { readSourceFile } from '../../src/ingest/read.js';
import { runCli } from '../cli/run-cli.js';

/**
 * The SHA-256 of an input taken on another thread (src/ingest/background-hash.ts) while the
 * window's bytes are parsed must be exactly `createHash('sha256')` of the file's bytes, for any
 * size (empty and one byte included) and however the bytes arrive.
 */
const dir = mkdtempSync(join(tmpdir(), 'navassay-hash-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const sha256Of = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

/** Reads a file through a window as the CSV reader does, every byte used before moving on. */
function hashThroughWindow(path: string, windowBytes: number, backgroundHashBytes: number): string {
  const window = FileWindow.open(path, 1 << 30, windowBytes, backgroundHashBytes);
  try {
    let keep = 0;
    while (!window.final) {
      window.moveOn(keep);
      keep = window.bytes.length >> 1; // keep half, as an unfinished row would be kept
    }
    return window.sha256();
  } finally {
    window.close();
  }
}

describe('the SHA-256 taken on the hashing thread', () => {
  it('is createHash of the bytes added, however they are cut into runs', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 3000 }), fc.array(fc.nat({ max: 3000 }), { maxLength: 8 }), (bytes, cuts) => {
        const shared = new Uint8Array(new SharedArrayBuffer(bytes.length));
        shared.set(bytes);
        const hash = new BackgroundHash();
        const edges = [0, ...cuts.map((cut) => Math.min(cut, bytes.length)).sort((a, b) => a - b), bytes.length];
        for (let k = 1; k < edges.length; k++) hash.add(shared.subarray(edges[k - 1], edges[k]));
        expect(hash.sha256()).toBe(sha256Of(bytes));
      }),
      { numRuns: 40 },
    );
  });

  it('is createHash of the file for files of 0, 1, 2, 17, 1000 and 100,000 bytes, through windows of any size', () => {
    for (const size of [0, 1, 2, 17, 1000, 100_000]) {
      const bytes = Buffer.alloc(size);
      for (let i = 0; i < size; i++) bytes[i] = (i * 7919 + 13) & 255;
      const path = join(dir, `bytes-${size}`);
      writeFileSync(path, bytes);
      for (const windowBytes of [1, 16, 4096, 1 << 20]) {
        expect(hashThroughWindow(path, windowBytes, 0)).toBe(sha256Of(bytes));
        expect(hashThroughWindow(path, windowBytes, Number.MAX_SAFE_INTEGER)).toBe(sha256Of(bytes));
      }
    }
  });

  it('reaches the snapshot manifest through the command line, for a NAV file above the hashing thread\'s threshold', async () => {
    const rows = Math.ceil((BACKGROUND_HASH_BYTES + 1) / 'NVA0001,2000-01-03,100.125\n'.length);
    const lines = ['series_id,date,nav'];
    for (let k = 0; k < rows; k++) lines.push(`NVA${String(k % 97).padStart(4, '0')},${isoDay(k)},${100 + (k % 1000) / 8}`);
    const nav = join(dir, 'nav.csv');
    writeFileSync(nav, lines.join('\n') + '\n');
    const store = join(dir, 'store');
    const answer = await runCli('ingest', '--nav', nav, '--store', store, '--feed', 'big', '--as-of', '2026-11-30', '--format', 'json');
    expect(answer.status).toBe(0);
    const manifest = JSON.parse(readFileSync(findManifest(store), 'utf8')) as { files: Array<{ kind: string; source_sha256: string }> };
    expect(manifest.files.find((file) => file.kind === 'nav')?.source_sha256).toBe(sha256Of(readFileSync(nav)));
  });
});

describe('an input hashed while it is read', () => {
  it('readInputFile tells every run of bytes as it lands, in order, and the runs make the file', () => {
    for (const size of [0, 1, (8 << 20) - 1, (8 << 20) + 1, (20 << 20) + 5]) {
      const bytes = Buffer.alloc(size);
      for (let i = 0; i < size; i++) bytes[i] = (i * 7919 + 13) & 255;
      const path = join(dir, `runs-${size}`);
      writeFileSync(path, bytes);
      const runs: Buffer[] = [];
      const read = readInputFile(path, 1 << 30, 'the file', true, () => (run) => runs.push(Buffer.from(run)));
      expect(read.buffer).toBeInstanceOf(SharedArrayBuffer);
      expect(Buffer.concat(runs).equals(bytes), `size ${size}`).toBe(true);
      expect(read.equals(bytes)).toBe(true);
    }
  });

  it("gives an Arrow file above the hashing thread's threshold the SHA-256 createHash gives the file", async () => {
    const rows = Math.ceil(BACKGROUND_HASH_BYTES / 16) + 1000; // 16 bytes a row: index, day, value
    const indices = new Int32Array(rows).map((_, k) => Math.floor((k * 3) / rows));
    const days = new Int32Array(rows).map((_, k) => 10_000 + (k % 5000));
    const values = new Float64Array(rows).map((_, k) => 100 + (k % 977) / 8);
    const table = new Table({
      series_id: makeVector(makeData({ type: new Dictionary(new Utf8(), new Int32()), data: indices, dictionary: vectorFromArray(['FUND-A', 'FUND-B', 'FUND-C'], new Utf8()) })),
      date: makeVector(makeData({ type: new DateDay(), data: days })),
      nav: makeVector(makeData({ type: new Float64(), data: values })),
    });
    const path = join(dir, 'nav.arrow');
    writeFileSync(path, tableToIPC(table, 'file'));
    expect(readFileSync(path).length).toBeGreaterThan(BACKGROUND_HASH_BYTES);
    const read = await readSourceFile(path, 'nav', DEFAULT_PROFILE);
    expect(read.result.rows.accepted).toBe(rows);
    expect(read.sha256).toBe(sha256Of(readFileSync(path)));
  });
});

/** Distinct dates for rows of one series, every row a different day from 2000-01-03 on. */
function isoDay(k: number): string {
  return new Date(Date.UTC(2000, 0, 3) + Math.floor(k / 97) * 86_400_000).toISOString().slice(0, 10);
}

function findManifest(at: string): string {
  for (const entry of readdirSync(at, { withFileTypes: true, recursive: true })) {
    if (entry.isFile() && entry.name === 'manifest.json') return join(entry.parentPath, entry.name);
  }
  throw new Error(`no manifest under ${at}`);
}
