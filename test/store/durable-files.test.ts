import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { jsonPieces } from '../../src/report/json-pieces.js';
import { utf8Pieces, writeFileDurably } from '../../src/store/durable-files.js';

// Any UTF-16 code unit, lone surrogates included: the strings a report can hold after a feed's
// text went through JSON.stringify or a template.
const codeUnit = fc.integer({ min: 0, max: 0xffff }).map((code) => String.fromCharCode(code));
const anyText = fc.string({ unit: fc.oneof(codeUnit, fc.constantFrom('\u{1F600}', 'é', '—', 'a')), maxLength: 60 });

const joined = (pieces: Iterable<Uint8Array>) => Buffer.concat([...pieces]);

describe('a text written in pieces', () => {
  // The reference is Node's own encoder on the whole text (WHATWG UTF-8: a lone surrogate becomes U+FFFD).
  it('gives exactly the bytes of the whole text encoded at once, whatever the piece size', () => {
    fc.assert(
      fc.property(anyText, fc.integer({ min: 1, max: 7 }), (text, size) => {
        expect(joined(utf8Pieces(text, size)).equals(Buffer.from(text, 'utf8'))).toBe(true);
      }),
      { numRuns: 2000 },
    );
  });

  it('never splits a surrogate pair: a one-character piece size still yields whole emoji', () => {
    const pieces = [...utf8Pieces('a\u{1F600}b', 1)].map((piece) => Buffer.from(piece).toString('utf8'));
    expect(pieces).toEqual(['a', '\u{1F600}', 'b']);
  });

  const dir = mkdtempSync(join(tmpdir(), 'navassay-durable-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('writes a text of several pieces to the disk byte for byte', () => {
    const text = 'série — ✓ \u{1F600}\n'.repeat(300_000); // about 6 M characters, more than one piece
    const path = join(dir, 'large.txt');
    writeFileDurably(path, text);
    expect(readFileSync(path).equals(Buffer.from(text, 'utf8'))).toBe(true);
  });

  it('writes texts handed over in pieces, small and larger than its buffer, byte for byte', () => {
    const rows = Array.from({ length: 40_000 }, (_, i) => ({ id: `NVA${i}`, note: i % 7 === 0 ? 'écart — \u{1F600}' : null, value: i / 3 }));
    const value = { results: rows, long_text: 'x—'.repeat(700_000) };
    const path = join(dir, 'pieces.json');
    writeFileDurably(path, jsonPieces(value, 2));
    expect(readFileSync(path).equals(Buffer.from(JSON.stringify(value, null, 2), 'utf8'))).toBe(true);
  });
});
