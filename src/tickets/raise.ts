import { createHash } from 'node:crypto';
import { findingKey, isSeverity, type Finding, type Severity } from '../findings.js';
import { wordingOf } from './actions.js';
import { absorbedKeys, worstSeverity, type FeedPattern } from './patterns.js';
import type { ReconciliationInput, Ticket } from './ticket.js';

/**
 * Findings → tickets: one ticket per series and check (a stale run is one ticket, two vendor
 * slips on one series one ticket), one per feed-level pattern (the findings it absorbs raise no
 * ticket of their own), one per file-level check, and, when reconciliation ran, one per series
 * with breaches and one per vendor-level explanation.
 */
export interface TicketInputs {
  readonly findings: readonly Finding[];
  readonly patterns?: readonly FeedPattern[];
  /** Series id → category from the master. */
  readonly categories?: ReadonlyMap<string, string | null>;
  readonly reconciliation?: ReconciliationInput | null;
}

const EVIDENCE_LISTED = 20;

export function raiseTickets(inputs: TicketInputs): Ticket[] {
  const patterns = inputs.patterns ?? [];
  const absorbed = absorbedKeys(patterns);
  const categories = inputs.categories ?? new Map<string, string | null>();
  const groups = new Map<string, Finding[]>();
  for (const finding of inputs.findings) {
    if (absorbed.has(finding.key)) continue;
    const key = findingKey(finding.check, finding.series_id);
    const group = groups.get(key);
    if (group) group.push(finding);
    else groups.set(key, [finding]);
  }
  const tickets = [
    ...patterns.map((pattern) => patternTicket(pattern, categories)),
    ...[...groups.entries()].map(([key, findings]) => seriesTicket(key, findings, categories)),
    ...reconciliationTickets(inputs.reconciliation ?? null, categories),
  ];
  return tickets.sort((a, b) => a.key.localeCompare(b.key));
}

function seriesTicket(key: string, findings: readonly Finding[], categories: ReadonlyMap<string, string | null>): Ticket {
  const { check, series_id: seriesId } = findings[0];
  const wording = wordingOf(check);
  const count = findings.length > 1 ? ` (${findings.length} findings)` : '';
  return ticket({
    key,
    kind: seriesId === null ? 'feed' : 'series',
    check,
    severity: worstSeverity(findings.map((f) => f.severity)),
    title: `${seriesId ?? 'feed'}: ${wording.title}${count}`,
    series_ids: seriesId === null ? [] : [seriesId],
    category: seriesId === null ? null : (categories.get(seriesId) ?? null),
    start: earliest(findings.map((f) => f.start)),
    end: latest(findings.map((f) => f.end)),
    action: wording.action,
    finding_keys: findings.map((f) => f.key),
    evidence: { findings: findings.slice(0, EVIDENCE_LISTED).map(({ key: k, start, end, message, evidence }) => ({ key: k, start, end, message, evidence })), count: findings.length },
  });
}

function patternTicket(pattern: FeedPattern, categories: ReadonlyMap<string, string | null>): Ticket {
  const f = pattern.finding;
  const series = (f.evidence.series_ids as string[] | undefined) ?? [];
  const shared = [...new Set(series.map((id) => categories.get(id) ?? null))];
  return ticket({
    key: f.key,
    kind: 'feed',
    check: f.check,
    severity: f.severity,
    title: `feed: ${wordingOf(f.check).title} (${f.evidence.series_count} series)`,
    series_ids: series,
    category: shared.length === 1 ? shared[0] : null,
    start: f.start,
    end: f.end,
    action: wordingOf(f.check).action,
    finding_keys: pattern.absorbed,
    evidence: { message: f.message, ...f.evidence },
  });
}

/** Breaches grouped per series; each vendor-level explanation its own ticket. */
function reconciliationTickets(reconciliation: ReconciliationInput | null, categories: ReadonlyMap<string, string | null>): Ticket[] {
  if (!reconciliation) return [];
  const bySeries = new Map<string, NonNullable<ReconciliationInput['results']>[number][]>();
  for (const result of reconciliation.results ?? []) {
    if (result.status !== 'breach') continue;
    bySeries.set(result.series_id, [...(bySeries.get(result.series_id) ?? []), result]);
  }
  const breaches = [...bySeries.entries()].map(([seriesId, results]) => {
    const identities = results.map((r) => findingKey('reconcile_breach', seriesId, r.window ?? null, r.metric ?? null));
    return ticket({
      key: findingKey('reconcile_breach', seriesId),
      kind: 'reconciliation',
      check: 'reconcile_breach',
      severity: 'error',
      title: `${seriesId}: ${wordingOf('reconcile_breach').title} (${results.map((r) => `${r.metric ?? '?'} ${r.window ?? ''}`.trim()).join(', ')})`,
      series_ids: [seriesId],
      category: categories.get(seriesId) ?? null,
      start: null,
      end: null,
      action: wordingOf('reconcile_breach').action,
      finding_keys: identities,
      evidence: { results: results.slice(0, EVIDENCE_LISTED) },
    });
  });
  const explanations = (reconciliation.vendor_explanations ?? []).map((explanation, index) => {
    const identity = explanation.key ?? (explanation.changes ? JSON.stringify(explanation.changes) : String(index));
    const severity: Severity = explanation.severity && isSeverity(explanation.severity) ? explanation.severity : 'warning';
    const text = explanation.message ?? explanation.explanation ?? JSON.stringify(explanation.changes ?? {});
    return ticket({
      key: findingKey('vendor_explanation', explanation.vendor ?? null, identity),
      kind: 'reconciliation',
      check: 'vendor_explanation',
      severity,
      title: `${explanation.vendor ?? 'vendor'}: ${text}`,
      series_ids: [...(explanation.series_ids ?? [])].sort(),
      category: null,
      start: null,
      end: null,
      action: wordingOf('vendor_explanation').action,
      finding_keys: [identity],
      evidence: { ...explanation },
    });
  });
  return [...breaches, ...explanations];
}

function ticket(draft: Omit<Ticket, 'fingerprint'>): Ticket {
  const fingerprint = createHash('sha256').update([...draft.finding_keys].sort().join('\n')).digest('hex').slice(0, 12);
  return { ...draft, fingerprint };
}

function earliest(dates: ReadonlyArray<string | null>): string | null {
  return dates.filter((d): d is string => d !== null).sort()[0] ?? null;
}

function latest(dates: ReadonlyArray<string | null>): string | null {
  return dates.filter((d): d is string => d !== null).sort().pop() ?? null;
}
