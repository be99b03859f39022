import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { printedDecimals } from '../../src/reconcile/precision.js';

/**
 * printedDecimals reads a plain decimal (`0.1412`, `-14`) by its characters and any other text
 * by a regular expression. The plain path must give what the regular expression gives, which is
 * the whole of the function as it was written first (copied here).
 */
function decimalsByRegularExpression(text: string): number {
  const match = /^[^\deE]*[\d\s'.,]*?(?:[.,](\d+))?\s*(?:[eE]([+-]?\d+))?\s*%?\s*$/.exec(text.trim());
  const fraction = match?.[1]?.length ?? 0;
  const exponent = match?.[2] === undefined ? 0 : Number(match[2]);
  return fraction - exponent;
}

const digits = fc.stringMatching(/^\d{0,12}$/);
/** Plain decimals as vendors print them, with the edge cases of the plain path (no digits, a bare point, a sign). */
const plainLike = fc
  .tuple(fc.constantFrom('', '-', '+', '--'), digits, fc.constantFrom('', '.', ','), digits)
  .map(([sign, whole, point, fraction]) => `${sign}${whole}${point}${fraction}`);
/** Any short text of the characters the regular expression treats apart. */
const anyText = fc
  .array(fc.constantFrom('0', '1', '7', '9', '.', ',', '-', '+', 'e', 'E', '%', ' ', "'", '\t', 'x'), { maxLength: 12 })
  .map((characters) => characters.join(''));

describe('printed decimals', () => {
  it('of a plain decimal, read by its characters, are those the regular expression reads', () => {
    fc.assert(fc.property(plainLike, (text) => {
      expect(printedDecimals(text)).toBe(decimalsByRegularExpression(text));
    }), { numRuns: 5000 });
  });

  it('of any other text are those the regular expression reads', () => {
    fc.assert(fc.property(anyText, (text) => {
      expect(printedDecimals(text)).toBe(decimalsByRegularExpression(text));
    }), { numRuns: 5000 });
  });

  it.each([
    ['0.1412', 4],
    ['-0.9339', 4],
    ['14', 0],
    ['3.', 0],
    ['1,234.56', 2],
    ['12,34', 2],
    ['1.2e-3', 4],
    [' 0.10 ', 2],
  ] as const)('%s has %d (by hand: digits after the last separator, less the exponent)', (text, expected) => {
    expect(printedDecimals(text)).toBe(expected);
  });
});
