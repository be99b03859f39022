import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { civilFromEpochDay, epochDay, formatIsoDate, isValidCivilDate, parseIsoDate } from '../../src/calendar/days.js';
import { numberStyle, numericDateReadings, parseDateText, parseIsoDateBytes, parseNumberBytes, parseNumberText, readPlainDecimal } from '../../src/ingest/scalars.js';

const RUNS = { numRuns: 20_000 };
const finite = fc.double({ noNaN: true, noDefaultInfinity: true });

/** The correctly rounded value of `text` × 10^-2, which is what `text%` must give. */
function percentOf(text: string): number {
  const match = /^(.*?)(?:[eE]([+-]?\d+))?$/.exec(text)!;
  return Number(`${match[1]}e${Number(match[2] ?? 0) - 2}`);
}

/** Groups the integer digits of a plain decimal string in threes. */
function grouped(text: string, thousands: string, decimal: string): string {
  const negative = text.startsWith('-');
  const [whole, fraction] = (negative ? text.slice(1) : text).split('.');
  const groups = whole.replace(/\B(?=(\d{3})+(?!\d))/g, thousands);
  return `${negative ? '-' : ''}${groups}${fraction === undefined ? '' : decimal + fraction}`;
}

describe('parseNumberBytes equals Number() exactly', () => {
  it('String(x) of random finite doubles', () => {
    fc.assert(
      fc.property(finite, (x) => {
        const text = String(x);
        expect(Object.is(parseNumberText(text), Number(text))).toBe(true);
      }),
      RUNS,
    );
  });

  it('toFixed(k) of random doubles', () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e20, max: 1e20 }), fc.integer({ min: 0, max: 20 }), (x, k) => {
        const text = x.toFixed(k);
        expect(Object.is(parseNumberText(text), Number(text))).toBe(true);
      }),
      RUNS,
    );
  });

  it('random digit strings, up to and past 15 significant digits, with leading zeros', () => {
    const digits = (min: number, max: number) => fc.string({ unit: fc.constantFrom(...'0123456789'), minLength: min, maxLength: max });
    fc.assert(
      fc.property(fc.constantFrom('', '-', '+'), digits(1, 18), fc.option(digits(0, 18), { nil: undefined }), (sign, whole, fraction) => {
        const text = `${sign}${whole}${fraction === undefined ? '' : '.' + fraction}`;
        expect(Object.is(parseNumberText(text), Number(text))).toBe(true);
      }),
      RUNS,
    );
  });

  it('the hardest 15-digit cases: every mantissa/10^k halfway neighbourhood', () => {
    // Values like 0.1, 0.3, 1.005, 123456789012345 at every scale.
    for (const m of [1, 3, 7, 1005, 123456789012345, 999999999999999, 100000000000001, 444444444444444]) {
      for (let k = 0; k <= 15; k++) {
        const text = (m / 1).toString().padStart(k + 1, '0');
        const decimal = k === 0 ? text : `${text.slice(0, text.length - k)}.${text.slice(text.length - k)}`;
        expect(parseNumberText(decimal)).toBe(Number(decimal));
        expect(parseNumberText(decimal + '%')).toBe(percentOf(decimal));
      }
    }
  });

  it('text followed by % is the same decimal moved two places, rounded once', () => {
    expect(parseNumberText('12.3%')).toBe(0.123);
    expect(parseNumberText('0.7%')).toBe(0.007);
    fc.assert(
      fc.property(finite, fc.integer({ min: 0, max: 12 }), fc.boolean(), (x, k, useFixed) => {
        const text = useFixed && Math.abs(x) < 1e20 ? x.toFixed(k) : String(x);
        const expected = percentOf(text);
        const value = parseNumberText(`${text}%`);
        if (Number.isFinite(expected)) expect(Object.is(value, expected)).toBe(true);
        else expect(value).toBeNaN();
      }),
      RUNS,
    );
  });

  it('grouped thousands and decimal commas read the same number', () => {
    const styles: Array<[string, string]> = [
      [',', '.'],
      ['.', ','],
      [' ', ','],
      ["'", '.'],
      ['_', '.'],
    ];
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e15, max: 1e15 }), fc.integer({ min: 0, max: 6 }), fc.constantFrom(...styles), (x, k, [thousands, decimal]) => {
        const plain = x.toFixed(k);
        const text = grouped(plain, thousands, decimal);
        const bytes = Buffer.from(text);
        expect(Object.is(parseNumberBytes(bytes, 0, bytes.length, numberStyle(decimal, thousands)), Number(plain))).toBe(true);
      }),
      RUNS,
    );
  });

  it('never accepts what Number() would refuse, never returns ±Infinity', () => {
    fc.assert(
      fc.property(fc.string({ unit: fc.constantFrom(...'0123456789.-+eE% x,'), maxLength: 12 }), (text) => {
        const value = parseNumberText(text);
        if (Number.isNaN(value)) return;
        expect(Number.isFinite(value)).toBe(true);
        const core = text.trim().replace(/\s*%$/, '');
        expect(/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(core)).toBe(true);
        expect(Object.is(value, text.trim().endsWith('%') ? percentOf(core) : Number(core))).toBe(true);
      }),
      RUNS,
    );
  });
});

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
const pad = (n: number, width = 2) => String(n).padStart(width, '0');

describe('dates', () => {
  it('epochDay agrees with Date.UTC over ±100 000 years', () => {
    fc.assert(
      fc.property(fc.integer({ min: -36_500_000, max: 36_500_000 }), (days) => {
        const { year, month, day } = civilFromEpochDay(days);
        expect(isValidCivilDate(year, month, day)).toBe(true);
        expect(epochDay(year, month, day)).toBe(days);
        const date = new Date(0);
        date.setUTCFullYear(year, month - 1, day);
        expect(date.getTime() / 86_400_000).toBe(days);
      }),
      RUNS,
    );
  });

  it('ISO, day-first, month-first and month-name writings parse back to the same day', () => {
    const first = epochDay(1000, 1, 1);
    const last = epochDay(9999, 12, 31);
    fc.assert(
      fc.property(fc.integer({ min: first, max: last }), fc.constantFrom('-', '/', '.'), (days, sep) => {
        const { year, month, day } = civilFromEpochDay(days);
        const iso = formatIsoDate(days);
        const isoBytes = Buffer.from(` ${iso} `);
        expect(parseIsoDateBytes(isoBytes, 0, isoBytes.length)).toBe(days);
        expect(parseIsoDate(iso)).toBe(days);
        for (const format of ['auto', 'iso', 'day-first', 'month-first'] as const) expect(parseDateText(iso, format)).toBe(days);
        const dayFirst = `${pad(day)}${sep}${pad(month)}${sep}${year}`;
        const monthFirst = `${pad(month)}${sep}${pad(day)}${sep}${year}`;
        expect(parseDateText(dayFirst, 'day-first')).toBe(days);
        expect(parseDateText(`${day}${sep}${month}${sep}${year}`, 'day-first')).toBe(days);
        expect(parseDateText(monthFirst, 'month-first')).toBe(days);
        expect(parseDateText(dayFirst, 'auto')).toBeNull();
        expect(numericDateReadings(dayFirst)).toEqual({ dayFirst: true, monthFirst: day <= 12 && isValidCivilDate(year, day, month) });
        const named = `${pad(day)}-${MONTHS[month - 1]}-${year}`;
        for (const format of ['auto', 'day-first', 'month-first'] as const) {
          expect(parseDateText(named, format)).toBe(days);
          expect(parseDateText(`${MONTHS[month - 1].toUpperCase()} ${day} ${year}`, format)).toBe(days);
        }
        expect(parseDateText(`${year}${pad(month)}${pad(day)}`, 'auto')).toBe(days);
      }),
      RUNS,
    );
  });

  it('spaces and tabs around a date are padding; any other blank character is damage', () => {
    // docs/ingestion.md: "surrounding spaces and tabs are trimmed from every value". A CI seed
    // found `2019-04-14<vertical tab>` read as a date while the same rule rejects it for a NAV.
    const day = epochDay(2019, 4, 14);
    const blanks = fc.constantFrom(' ', '\t');
    const damage = fc.constantFrom('\v', '\f', '\u00a0', '\u2028', '\ufeff');
    fc.assert(
      fc.property(fc.array(blanks, { maxLength: 3 }), fc.array(blanks, { maxLength: 3 }), damage, fc.boolean(), (before, after, odd, atEnd) => {
        for (const written of ['2019-04-14', '2019/4/14', '20190414', '14-Apr-2019']) {
          expect(parseDateText(`${before.join('')}${written}${after.join('')}`, 'auto')).toBe(day);
          expect(parseDateText(atEnd ? `${written}${odd}` : `${odd}${written}`, 'auto')).toBeNull();
        }
      }),
      RUNS,
    );
  });

  it('a zero-padded day, month or year is not a date: a day or month has one or two digits, a year four', () => {
    // docs/ingestion.md: ISO is exactly YYYY-MM-DD; the other forms allow an unpadded day or
    // month (`2026-1-5`) but never a three- or four-digit one. A tester found `2026-11-0027` read.
    const widths = fc.constantFrom(1, 2, 3, 4);
    fc.assert(
      fc.property(fc.integer({ min: 1900, max: 2199 }), fc.integer({ min: 1, max: 12 }), fc.integer({ min: 1, max: 28 }), widths, widths, fc.constantFrom('-', '/', '.', ' '), (year, month, day, monthWidth, dayWidth, sep) => {
        const m = String(month).padStart(monthWidth, '0');
        const d = String(day).padStart(dayWidth, '0');
        const fits = m.length <= 2 && d.length <= 2;
        const expected = fits ? epochDay(year, month, day) : null;
        for (const format of ['auto', 'day-first', 'month-first'] as const) expect(parseDateText(`${year}${sep}${m}${sep}${d}`, format)).toBe(expected);
        expect(parseDateText(`${d}${sep}${m}${sep}${year}`, 'day-first')).toBe(expected);
        expect(parseDateText(`${m}${sep}${d}${sep}${year}`, 'month-first')).toBe(expected);
        expect(parseDateText(`${d}-Dec-${year}`, 'auto')).toBe(d.length <= 2 ? epochDay(year, 12, day) : null);
      }),
      RUNS,
    );
    expect(parseDateText('2026-11-0027', 'auto')).toBeNull();
    expect(parseDateText('2026-0011-27', 'auto')).toBeNull();
    expect(parseDateText('0027-11-2026', 'day-first')).toBeNull();
    expect(parseDateText('02026-11-27', 'auto')).toBeNull();
    expect(parseDateText('2026-05-Sept', 'auto')).toBeNull(); // a month name read as the day
    expect(parseDateText('05-05-Sept', 'day-first')).toBeNull(); // no four-digit year at all
  });

  it('the byte ISO parser and the text ISO parser agree on any 10-character text', () => {
    fc.assert(
      fc.property(fc.string({ unit: fc.constantFrom(...'0123456789-'), minLength: 10, maxLength: 10 }), (text) => {
        const bytes = Buffer.from(text);
        expect(parseIsoDateBytes(bytes, 0, 10)).toBe(parseIsoDate(text));
      }),
      RUNS,
    );
    expect(parseIsoDateBytes(Buffer.from('2024-02-29'), 0, 10)).toBe(epochDay(2024, 2, 29));
    expect(parseIsoDateBytes(Buffer.from('2100-02-29'), 0, 10)).toBeNull();
    expect(parseIsoDateBytes(Buffer.from('2000-02-29'), 0, 10)).toBe(11016);
  });
});

/**
 * The CSV reader's shortcut for plain decimals must give exactly what the general parser gives:
 * `Number()` of the text is the outside oracle, `parseNumberBytes` the rule it stands in for.
 */
describe('readPlainDecimal equals Number() on plain decimals and leaves the rest to parseNumberBytes', () => {
  it('toFixed(k) of random doubles up to 15 digits is read whole, to the last byte', () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e9, max: 1e9 }), fc.integer({ min: 0, max: 5 }), (x, k) => {
        const text = x.toFixed(k);
        const bytes = Buffer.from(`${text},`, 'latin1');
        const out = new Float64Array(1);
        const end = readPlainDecimal(bytes, 0, 46, out, 0);
        if (text.replace(/[-.]/g, '').length > 15) return expect(end).toBe(-1);
        expect(end).toBe(text.length);
        expect(Object.is(out[0], Number(text))).toBe(true);
      }),
      RUNS,
    );
  });

  it('any text: either refused, or the number it stops after reads the same under parseNumberBytes', () => {
    const text = fc.string({ unit: fc.constantFrom('0', '1', '9', '-', '+', '.', ',', 'e', '%', ' ', '"'), maxLength: 20 });
    fc.assert(
      fc.property(text, fc.constantFrom('.', ','), (written, decimal) => {
        const bytes = Buffer.from(written, 'latin1');
        const out = new Float64Array(1);
        const end = readPlainDecimal(bytes, 0, decimal.charCodeAt(0), out, 0);
        if (end < 0) return;
        const style = numberStyle(decimal, '');
        expect(Object.is(out[0], parseNumberBytes(bytes, 0, end, style))).toBe(true);
        expect(/^-?\d*[.,]?\d*$/.test(written.slice(0, end))).toBe(true);
      }),
      RUNS,
    );
  });
});
