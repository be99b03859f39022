import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { encodedChunks, OverlappedWriter } from '../../src/report/overlapped-writer.js';

let work: string;

beforeEach(() => {
  work = mkdtempSync(join(tmpdir(), 'navassay-overlapped-'));
});

afterEach(() => {
  rmSync(work, { recursive: true, force: true });
});

// Node's own UTF-8 encoder is the oracle: the chunks together must be exactly its bytes.
const utf8 = (texts: readonly string[]) => Buffer.from(texts.join(''), 'utf8');
const joined = (chunks: Iterable<Uint8Array>) => Buffer.concat([...chunks]);
// Buffer.equals: a deep equality over megabytes, element by element, takes minutes.
const sameBytes = (a: Buffer, b: Buffer) => expect(a.equals(b), `${a.length} bytes against ${b.length}`).toBe(true);

describe('encodedChunks', () => {
  it("gives exactly Node's UTF-8 bytes of any texts, whole characters in each piece", () => {
    // Whole code points per piece (as JSON pieces are): letters, accents, CJK, emoji (surrogate pairs).
    const piece = fc.array(fc.constantFrom('a', 'é', '€', '中', '😀', '\n', '"', '\\u0000'), { maxLength: 60 }).map((parts) => parts.join(''));
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 40 }), (texts) => {
        expect(joined(encodedChunks(texts))).toEqual(utf8(texts));
      }),
    );
  });

  it('cuts texts longer than a buffer without splitting a surrogate pair, and fills buffers of at most 1 MiB', () => {
    // 600,000 emoji: 1.2 M UTF-16 units, 2.4 MB of UTF-8, more than two buffers.
    const long = '😀'.repeat(600_000);
    const chunks = [...encodedChunks(['{', long, 'é}'])];
    expect(chunks.length).toBeGreaterThan(2);
    for (const chunk of chunks) expect(chunk.length).toBeLessThanOrEqual(1 << 20);
    sameBytes(joined(chunks), utf8(['{', long, 'é}']));
    sameBytes(joined(encodedChunks(long)), utf8([long]));
    expect([...encodedChunks('')]).toEqual([]);
  });
});

describe('OverlappedWriter', () => {
  it('writes every file whole under its name, with no temporary file left, even with a budget smaller than a file', async () => {
    // A 4 KiB budget makes most chunks wait for earlier ones to reach the file system.
    const writer = new OverlappedWriter(4096);
    const big = Array.from({ length: 5000 }, (_, i) => `{"row": ${i}, "name": "série ${i} 😀"}\n`);
    await writer.write(join(work, 'a.json'), big);
    await writer.write(join(work, 'sub', 'b.csv'), 'x,y\n1,2\n');
    await writer.write(join(work, 'empty.txt'), '');
    await writer.finished();
    sameBytes(readFileSync(join(work, 'a.json')), utf8(big));
    expect(readFileSync(join(work, 'sub', 'b.csv'), 'utf8')).toBe('x,y\n1,2\n');
    expect(readFileSync(join(work, 'empty.txt'), 'utf8')).toBe('');
    expect(readdirSync(work).sort()).toEqual(['a.json', 'empty.txt', 'sub']);
  });

  it('replaces an existing file and clears a leftover temporary of this process', async () => {
    writeFileSync(join(work, 'report.json'), 'old');
    writeFileSync(join(work, `.report.json.${process.pid}.tmp`), 'leftover of a killed run');
    const writer = new OverlappedWriter();
    await writer.write(join(work, 'report.json'), ['{"new":', 'true}']);
    await writer.finished();
    expect(readFileSync(join(work, 'report.json'), 'utf8')).toBe('{"new":true}');
    expect(existsSync(join(work, `.report.json.${process.pid}.tmp`))).toBe(false);
  });

  it('fails with the file system error when a file cannot be made', async () => {
    writeFileSync(join(work, 'plain-file'), 'x');
    const writer = new OverlappedWriter();
    await expect(writer.write(join(work, 'plain-file', 'report.json'), '{}')).rejects.toMatchObject({ code: expect.stringMatching(/^(EEXIST|ENOTDIR)$/) });
  });
});
