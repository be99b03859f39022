import type { FeedCheck, FeedContext } from '../src/checks/check.js';
import type { Finding } from '../src/findings.js';
import { ISO_4217_CODES } from '../src/checks/iso4217.js';
import { isinCheckDigit, isValidIsin, looksLikeIsin } from '../src/checks/isin.js';
import { makeFinding } from '../src/checks/support.js';

/**
 * Identifiers that cannot be right: series ids shaped like an ISIN whose ISO 6166 check digit
 * is wrong (unless their prefix family is evidently a house scheme, see below), and master currencies that are not active ISO 4217 codes (such as `GBX` for pence
 * or `RMB`, common in vendor files but not ISO codes).
 */
export const invalidIdentifier: FeedCheck<Record<string, never>> = {
  id: 'invalid_identifier',
  scope: 'feed',
  purpose: 'ISIN-shaped ids with a wrong check digit and currencies that are not ISO 4217 codes.',
  defaults: {},
  run(context) {
    return [...badIsins(context), ...badCurrencies(context)];
  },
};

function badIsins({ nav, master }: FeedContext): Finding[] {
  const ids = [...new Set([...nav.ids, ...(master ?? []).map((record) => record.series_id)])].sort();
  const houseSchemes = lookalikeFamilies(ids.filter(looksLikeIsin));
  return ids
    .filter((id) => looksLikeIsin(id) && !isValidIsin(id) && !houseSchemes.has(id.slice(0, 2)))
    .map((id) =>
      makeFinding({
        check: 'invalid_identifier',
        severity: 'error',
        seriesId: id,
        start: null,
        end: null,
        message: `${id} looks like an ISIN but its check digit should be ${isinCheckDigit(id.slice(0, 11))}, not ${id[11]}; the identifier is mistyped.`,
        evidence: { kind: 'isin_check_digit', id, expected_check_digit: isinCheckDigit(id.slice(0, 11)) },
        identity: ['isin'],
      }),
    );
}

/**
 * Two-letter prefixes shared by three or more ISIN-shaped ids of which fewer than half pass
 * the check: a house scheme such as SERIES000001 that only looks like ISINs (random digits
 * pass one time in ten), not ISINs gone wrong.
 */
function lookalikeFamilies(isinShaped: string[]): Set<string> {
  const byPrefix = new Map<string, { total: number; valid: number }>();
  for (const id of isinShaped) {
    const family = byPrefix.get(id.slice(0, 2)) ?? { total: 0, valid: 0 };
    family.total++;
    if (isValidIsin(id)) family.valid++;
    byPrefix.set(id.slice(0, 2), family);
  }
  return new Set([...byPrefix].filter(([, f]) => f.total >= 3 && f.valid < f.total / 2).map(([prefix]) => prefix));
}

function badCurrencies({ master }: FeedContext): Finding[] {
  return (master ?? [])
    .filter((record) => record.currency !== null && !isIsoCurrency(record.currency))
    .map((record) =>
      makeFinding({
        check: 'invalid_identifier',
        severity: 'error',
        seriesId: record.series_id,
        start: null,
        end: null,
        message: `${record.series_id}'s currency "${record.currency}" in the series master is not an ISO 4217 currency code.`,
        evidence: { kind: 'currency', currency: record.currency, master_line: record.line },
        identity: ['currency', record.currency],
      }),
    );
}

/**
 * An ISO 4217 code, in either case ("eur" is a sloppy EUR). Mixed case is not forgiven: "GBp",
 * "ZAc" and "ILa" are the trade's notation for a currency's minor unit (pence, cents, agorot),
 * a factor of 100 away from the code that uppercasing them would give.
 */
function isIsoCurrency(currency: string): boolean {
  const code = currency.trim();
  if (code !== code.toUpperCase() && code !== code.toLowerCase()) return false;
  return ISO_4217_CODES.has(code.toUpperCase());
}
