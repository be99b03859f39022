import fc from 'fast-check';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { canonicalToArrowIpc } from '../../src/ingest/arrow-table.js';
import { NavassayError } from '../../src/ingest/errors.js';
import { DEFAULT_READ_LIMITS } from '../../src/ingest/limits.js';
import { canonicalToParquetBuffer } from '../../fixtures/parquet-writer.js';
import { DEFAULT_PROFILE } from '../../src/ingest/profile.js';
import { readFeedFile } from '../../src/ingest/read.js';
import type { IngestResult } from '../../src/ingest/table.js';
import { scratchDir } from '../cli/run-cli.js';
import { readText } from '../ingest/helpers.js';

/**
 * Damaged columnar files, as a vendor's broken export or a truncated transfer leaves them: every
 * one ends in rows with exact accounting or in a NavassayError (exit 2 or 3), never in another
 * exception and never in a hang. The time bound is the Arrow watchdog (limits.decode_timeout_ms,
 * lowered here) and, around everything, the test's own timeout.
 */
const navCsv = ['series_id,date,nav', ...Array.from({ length: 30 }, (_, k) => `NVA000${k % 4},2026-01-${String(1 + (k % 28)).padStart(2, '0')},${100 + k}.25`)].join('\n');
const navTable = readText(navCsv).table;
const validArrow = Buffer.from(canonicalToArrowIpc(navTable));
const validParquet = Buffer.from(canonicalToParquetBuffer(navTable));
const limits = { ...DEFAULT_READ_LIMITS, decodeTimeoutMs: 3000 };

type Damage = { kind: 'set'; at: number; byte: number } | { kind: 'truncate'; at: number } | { kind: 'zero'; at: number; length: number };

const damageArb: fc.Arbitrary<Damage> = fc.oneof(
  { weight: 6, arbitrary: fc.record({ kind: fc.constant('set' as const), at: fc.nat(), byte: fc.integer({ min: 0, max: 255 }) }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('truncate' as const), at: fc.nat() }) },
  { weight: 1, arbitrary: fc.record({ kind: fc.constant('zero' as const), at: fc.nat(), length: fc.integer({ min: 1, max: 16 }) }) },
);

function damage(bytes: Buffer, damages: readonly Damage[]): Buffer {
  let out = Buffer.from(bytes);
  for (const d of damages) {
    if (out.length === 0) break;
    const at = d.at % out.length;
    if (d.kind === 'set') out[at] = d.byte;
    else if (d.kind === 'truncate') out = out.subarray(0, at);
    else out.fill(0, at, Math.min(out.length, at + d.length));
  }
  return out;
}

async function readsOrRefuses(bytes: Uint8Array, name: string): Promise<void> {
  const path = join(scratchDir(), name);
  writeFileSync(path, bytes);
  let result: IngestResult;
  try {
    result = await readFeedFile(path, 'nav', DEFAULT_PROFILE, limits);
  } catch (error) {
    expect(error).toBeInstanceOf(NavassayError);
    expect([2, 3]).toContain((error as NavassayError).exitCode);
    expect((error as Error).message.length).toBeLessThan(1000);
    return;
  }
  expect(result.rows.read).toBe(result.rows.accepted + result.rows.rejected);
  expect(result.table.length).toBe(result.rows.accepted);
  expect(result.rejected.length).toBe(result.rows.rejected);
  expect(result.table.lines.length).toBe(result.rows.accepted);
}

describe('damaged columnar files end in rows or in one sentence, never a crash or a hang', () => {
  it('byte-damaged Parquet files', async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(damageArb, { minLength: 1, maxLength: 4 }), async (damages) => {
        await readsOrRefuses(damage(validParquet, damages), 'nav.parquet');
      }),
      { numRuns: 300 },
    );
  }, 240_000);

  it('byte-damaged Arrow files', async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(damageArb, { minLength: 1, maxLength: 4 }), async (damages) => {
        await readsOrRefuses(damage(validArrow, damages), 'nav.arrow');
      }),
      { numRuns: 40 },
    );
  }, 240_000);

  it('arbitrary bytes as Arrow, Parquet and CSV', async () => {
    await fc.assert(
      fc.asyncProperty(fc.uint8Array({ maxLength: 600 }), fc.constantFrom('x.arrow', 'x.parquet', 'x.csv'), async (bytes, name) => {
        await readsOrRefuses(bytes, name);
      }),
      { numRuns: 60 },
    );
  }, 240_000);
});
