import type { VendorFigureRecord } from '../ingest/records.js';

/**
 * The precision a vendor printed, read from the figure's raw text: half a unit of the last
 * printed digit, as a decimal. `0.1412` (four decimals) is ±0.00005; `14.12` in percent is
 * ±0.005 % = ±0.00005; `14.1%` is ±0.05 % = ±0.0005; `1.2e-3` is ±0.00005.
 * A figure that differs from navassay's by no more than this may be honest rounding.
 */
export function halfUnitOfPrinted(figure: Pick<VendorFigureRecord, 'raw_value' | 'unit'>): number {
  const text = figure.raw_value.trim();
  const inPercent = figure.unit === 'percent' || text.includes('%');
  return halfUnitOf(printedDecimals(text) + 1 + (inPercent ? 2 : 0));
}

/**
 * 5 / 10^places: 5 / 10^(d + 1) rather than 10^−d / 2, so that four decimals give 0.00005
 * exactly as printed. The common places are computed once, by the same expression.
 */
function halfUnitOf(places: number): number {
  return places >= 0 && places < HALF_UNITS.length ? HALF_UNITS[places] : 5 / 10 ** places;
}

const HALF_UNITS: readonly number[] = Array.from({ length: 24 }, (_, places) => 5 / 10 ** places);

/** Digits after the decimal separator (a point or a comma), less the exponent when there is one. */
export function printedDecimals(text: string): number {
  return plainDecimals(text) ?? decimalsOfAnyText(text);
}

/**
 * Digits after the point of a plain decimal (`0.1412`, `-14`, `3.`), read without a regular
 * expression: nearly every vendor figure is written so, and a daily run reads hundreds of
 * thousands of them. Null for any other text, which `decimalsOfAnyText` reads.
 */
function plainDecimals(text: string): number | null {
  let i = text.length > 0 && text.charCodeAt(0) === MINUS ? 1 : 0;
  const firstDigit = i;
  while (i < text.length && isDigit(text.charCodeAt(i))) i++;
  if (i === firstDigit) return null;
  if (i === text.length) return 0;
  if (text.charCodeAt(i) !== POINT) return null;
  const point = i++;
  while (i < text.length && isDigit(text.charCodeAt(i))) i++;
  return i === text.length ? i - point - 1 : null;
}

const MINUS = 0x2d;
const POINT = 0x2e;

function isDigit(code: number): boolean {
  return code >= 0x30 && code <= 0x39;
}

function decimalsOfAnyText(text: string): number {
  const match = /^[^\deE]*[\d\s'.,]*?(?:[.,](\d+))?\s*(?:[eE]([+-]?\d+))?\s*%?\s*$/.exec(text.trim());
  const fraction = match?.[1]?.length ?? 0;
  const exponent = match?.[2] === undefined ? 0 : Number(match[2]);
  return fraction - exponent;
}
