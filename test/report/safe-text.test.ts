import { describe, expect, it } from 'vitest';
import { csvCell, escapeHtml, markdownText } from '../../src/report/safe-text.js';

// Source: OWASP, "CSV Injection" — cells beginning with =, +, -, @, tab (0x09) or carriage
// return (0x0D) are evaluated by spreadsheets; prefixing a single quote makes them text.
describe('CSV cells a spreadsheet would run are neutralised, numbers stay numbers', () => {
  it.each([
    ['=HYPERLINK("http://example.invalid","x")', `"'=HYPERLINK(""http://example.invalid"",""x"")"`],
    ['+cmd', "'+cmd"],
    ['-2+3', "'-2+3"],
    ['@SUM(A1)', "'@SUM(A1)"],
    ['\tx', "'\tx"],
    ['\rx', `"'\rx"`],
  ])('%j → %j', (input, expected) => expect(csvCell(input)).toBe(expected));

  it.each([
    [-0.5, '-0.5'],
    ['-0.5', '-0.5'],
    ['+1.25', '+1.25'],
    ['-1e-7', '-1e-7'],
    [12, '12'],
  ])('the number %j stays %j', (input, expected) => expect(csvCell(input)).toBe(expected));
});

describe('Markdown and HTML show feed text as text', () => {
  it('markup, links and tags are literal', () => {
    expect(markdownText('<script>alert(1)</script>')).toBe('&lt;script&gt;alert\\(1\\)&lt;/script&gt;');
    expect(markdownText('[x](http://example.invalid) | *y*')).toBe('\\[x\\]\\(http://example.invalid\\) \\| \\*y\\*');
    expect(escapeHtml(`<img src=x onerror="a('b')">`)).toBe('&lt;img src=x onerror=&quot;a(&#39;b&#39;)&quot;&gt;');
  });
});
