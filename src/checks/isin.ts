/** ISO 6166 ISIN: two letters (country), nine alphanumerics, one check digit. */
const ISIN_SHAPE = /^[A-Z]{2}[A-Z0-9]{9}[0-9]$/;

export function looksLikeIsin(id: string): boolean {
  return ISIN_SHAPE.test(id);
}

/** The check digit ISO 6166 prescribes for the first eleven characters (letters A=10 … Z=35, then Luhn). */
export function isinCheckDigit(firstEleven: string): number {
  const digits = [...firstEleven].map((c) => (c >= 'A' ? String(c.charCodeAt(0) - 55) : c)).join('');
  let sum = 0;
  for (let i = digits.length - 1, double = true; i >= 0; i--, double = !double) {
    let d = Number(digits[i]);
    if (double) d = d * 2 > 9 ? d * 2 - 9 : d * 2;
    sum += d;
  }
  return (10 - (sum % 10)) % 10;
}

export function isValidIsin(id: string): boolean {
  return looksLikeIsin(id) && isinCheckDigit(id.slice(0, 11)) === Number(id[11]);
}
