import { describe, expect, it } from 'vitest';
import type { Finding } from '../../src/findings.js';
import { acknowledgementsFromYaml } from '../../src/tickets/acknowledgements.js';
import { advanceLedger, emptyLedger } from '../../src/tickets/ledger.js';
import { findFeedPatterns, type SeriesSpan } from '../../src/tickets/patterns.js';
import { raiseTickets } from '../../src/tickets/raise.js';

// The expected states are the rules of issue 12: a second run of the same day raises nothing new,
// a fault that disappears is resolved, a fault that comes back is reopened, an expired or changed
// acknowledgement shows its ticket again.

const finding = (check: string, series: string | null, start: string, extra: Partial<Finding> = {}): Finding => ({
  check,
  severity: 'warning',
  series_id: series,
  start,
  end: start,
  message: `${check} on ${series}`,
  evidence: {},
  key: `${check}|${series ?? '*'}|${start}`,
  ...extra,
});

const noAcks = new Map();

describe('ticket states across runs', () => {
  const stale = finding('stale_value', 'S1', '2026-11-02');
  const zero = finding('non_positive_value', 'S2', '2026-11-03', { severity: 'critical' });

  it('new, then open on a second run of the same day, then resolved when gone, then reopened', () => {
    const day1 = advanceLedger(emptyLedger('f'), raiseTickets({ findings: [stale, zero] }), '2026-11-26', noAcks);
    expect(day1.records.map((r) => r.state)).toEqual(['new', 'new']);
    const again = advanceLedger(day1.ledger, raiseTickets({ findings: [stale, zero] }), '2026-11-26', noAcks);
    expect(again.records.filter((r) => r.state === 'new')).toHaveLength(0);
    expect(again.ledger.runs).toHaveLength(1); // the same as-of counts once
    const fixed = advanceLedger(again.ledger, raiseTickets({ findings: [stale] }), '2026-11-27', noAcks);
    const resolved = fixed.records.find((r) => r.check === 'non_positive_value')!;
    expect(resolved.state).toBe('resolved');
    expect(resolved.resolved_on).toBe('2026-11-27');
    expect(fixed.records.find((r) => r.check === 'stale_value')!.state).toBe('open');
    const later = advanceLedger(fixed.ledger, raiseTickets({ findings: [stale] }), '2026-11-30', noAcks);
    expect(later.records.map((r) => r.check)).toEqual(['stale_value']); // resolved on an earlier day: not repeated
    const back = advanceLedger(later.ledger, raiseTickets({ findings: [stale, zero] }), '2026-12-01', noAcks);
    expect(back.records.find((r) => r.check === 'non_positive_value')!.state).toBe('reopened');
    expect(back.records.find((r) => r.check === 'non_positive_value')!.first_seen).toBe('2026-11-26');
  });

  it('one ticket per series and check: a stale run is one ticket however long, two slips of one check one ticket', () => {
    const tickets = raiseTickets({ findings: [finding('vendor_inconsistent', 'S1', '2026-11-30', { key: 'a' }), finding('vendor_inconsistent', 'S1', '2026-11-30', { key: 'b' }), stale] });
    expect(tickets.map((t) => t.key).sort()).toEqual(['stale_value|S1', 'vendor_inconsistent|S1']);
    // The key does not depend on the findings' dates: a run that grows keeps its ticket.
    const grown = raiseTickets({ findings: [{ ...stale, end: '2026-11-20' }] });
    expect(grown[0].key).toBe('stale_value|S1');
  });

  it('an acknowledgement silences through its expiry, not after; a changed problem or an edited entry is judged anew', () => {
    const acks = acknowledgementsFromYaml('- key: "stale_value|S1"\n  reason: price source confirmed closed\n  who: ops\n  expires: 2026-11-27\n', 'acks.yaml');
    const day1 = advanceLedger(emptyLedger('f'), raiseTickets({ findings: [stale] }), '2026-11-26', acks);
    expect(day1.records[0].silenced).toBe(true);
    expect(day1.records[0].acknowledgement!.status).toBe('active');
    const lastDay = advanceLedger(day1.ledger, raiseTickets({ findings: [stale] }), '2026-11-27', acks);
    expect(lastDay.records[0].silenced).toBe(true); // the expiry date itself is covered
    const expired = advanceLedger(lastDay.ledger, raiseTickets({ findings: [stale] }), '2026-11-30', acks);
    expect(expired.records[0].silenced).toBe(false);
    expect(expired.records[0].acknowledgement!.status).toBe('expired');

    const longer = acknowledgementsFromYaml('- key: "stale_value|S1"\n  reason: price source confirmed closed\n  who: ops\n  expires: 2027-01-31\n', 'acks.yaml');
    const second = finding('stale_value', 'S1', '2026-11-16', { key: 'stale_value|S1|2026-11-16' });
    const changed = advanceLedger(expired.ledger, raiseTickets({ findings: [stale, second] }), '2026-12-01', longer);
    // The edited entry is accepted for the problem as it is now …
    expect(changed.records[0].silenced).toBe(true);
    // … and a new finding joining the ticket afterwards shows it again.
    const third = finding('stale_value', 'S1', '2026-11-23', { key: 'stale_value|S1|2026-11-23' });
    const grown = advanceLedger(changed.ledger, raiseTickets({ findings: [stale, second, third] }), '2026-12-02', longer);
    expect(grown.records[0].silenced).toBe(false);
    expect(grown.records[0].acknowledgement!.status).toBe('problem_changed');
  });

  it('a wrong acknowledgement file names the file, the line and the key', () => {
    expect(() => acknowledgementsFromYaml('- key: "x"\n  reason: r\n  who: w\n  expires: 31/12/2026\n', 'acks.yaml')).toThrow(/acks\.yaml, line 4: 0\.expires: must be a date written YYYY-MM-DD/);
    expect(() => acknowledgementsFromYaml('- key: "x"\n  who: w\n  expires: 2026-12-31\n', 'acks.yaml')).toThrow(/acks\.yaml, line \d+: 0\.reason/);
  });
});

describe('findings grouped as a person thinks', () => {
  const spans: SeriesSpan[] = ['A', 'B', 'C', 'D', 'E'].map((id) => ({ series_id: id, calendar: 'ARDEN', category: 'equity', first: '2026-01-02', last: '2026-11-30' }));
  const missing = (id: string, date: string) => finding('missing_dates', id, date, { evidence: { missing_days: 1, missing_dates: [date] } });

  it('a date missing from every series of a calendar is one feed-level finding and one ticket listing the series', () => {
    const findings = ['A', 'B', 'C', 'D', 'E'].map((id) => missing(id, '2026-08-15'));
    findings.push(missing('A', '2026-03-03')); // A's own gap stays A's
    const patterns = findFeedPatterns(findings, spans);
    expect(patterns).toHaveLength(1);
    expect(patterns[0].finding.check).toBe('calendar_gap');
    expect(patterns[0].finding.evidence.series_ids).toEqual(['A', 'B', 'C', 'D', 'E']);
    expect(patterns[0].finding.evidence.dates).toEqual(['2026-08-15']);
    const tickets = raiseTickets({ findings, patterns });
    expect(tickets.map((t) => t.key).sort()).toEqual(['calendar_gap|*|ARDEN', 'missing_dates|A']);
    expect(tickets.find((t) => t.key === 'missing_dates|A')!.finding_keys).toEqual(['missing_dates|A|2026-03-03']);
  });

  it('a date missing from two of five series is two series problems, not a pattern', () => {
    expect(findFeedPatterns([missing('A', '2026-08-14'), missing('B', '2026-08-14')], spans)).toHaveLength(0);
  });

  it('the same first stale day across a family, and the same shift across several series, are one pattern each', () => {
    const stale = ['A', 'B', 'C'].map((id) => finding('stale_value', id, '2026-11-16'));
    const shifted = ['C', 'D', 'E'].map((id) => finding('date_shift', id, '2025-01-02', { evidence: { stamped_late_by_business_days: 1 } }));
    const patterns = findFeedPatterns([...stale, ...shifted], spans);
    expect(patterns.map((p) => p.finding.check).sort()).toEqual(['feed_date_shift', 'shared_stale_day']);
    expect(patterns.find((p) => p.finding.check === 'shared_stale_day')!.finding.message).toContain('(all equity)');
    expect(raiseTickets({ findings: [...stale, ...shifted], patterns })).toHaveLength(2);
  });
});

describe('reconciliation plugs in', () => {
  it('breaches raise one ticket per series, vendor-level explanations one each', () => {
    const tickets = raiseTickets({
      findings: [],
      reconciliation: {
        results: [
          { series_id: 'S1', window: '3y', metric: 'std_dev', status: 'breach', vendor: 0.14, computed: 0.13, tolerance: 0.0005 },
          { series_id: 'S1', window: '1y', metric: 'beta', status: 'breach' },
          { series_id: 'S2', window: '1y', metric: 'beta', status: 'match' },
        ],
        vendor_explanations: [{ vendor: 'vendor', changes: { sd_denominator: 'population' }, message: 'standard deviations use the population denominator' }],
      },
    });
    expect(tickets.map((t) => t.key)).toEqual(['reconcile_breach|S1', 'vendor_explanation|vendor|{"sd_denominator":"population"}']);
  });
});
