/**
 * Vendor-level explanations: when several breaches of one metric are reproduced by the same
 * change, that is one cause, said once — the sentence that goes into a ticket.
 */
export interface VendorPattern {
  readonly metric: string;
  readonly changes: Readonly<Record<string, unknown>>;
  /** Breaches of the metric this change reproduces, and all breaches of the metric. */
  readonly explained: number;
  readonly breaches: number;
  readonly sentence: string;
}

interface BreachForPatterns {
  readonly metric: string;
  readonly explanations: ReadonlyArray<{ readonly kind: string; readonly changes?: Readonly<Record<string, unknown>> }>;
}

/** A shared cause needs at least this many breaches; a single one is its own explanation. */
const MIN_SHARED = 2;

/** For each metric, the change that reproduces the most of its breaches (when shared), most first. */
export function vendorPatterns(breaches: readonly BreachForPatterns[]): VendorPattern[] {
  const byMetric = new Map<string, BreachForPatterns[]>();
  for (const breach of breaches) byMetric.set(breach.metric, [...(byMetric.get(breach.metric) ?? []), breach]);
  const patterns: VendorPattern[] = [];
  for (const [metric, list] of byMetric) {
    const counts = new Map<string, { changes: Readonly<Record<string, unknown>>; count: number }>();
    for (const breach of list) {
      const seen = new Set<string>();
      for (const explanation of breach.explanations) {
        if (explanation.kind !== 'convention' || !explanation.changes) continue;
        const signature = JSON.stringify(explanation.changes);
        if (seen.has(signature)) continue;
        seen.add(signature);
        const entry = counts.get(signature) ?? { changes: explanation.changes, count: 0 };
        entry.count++;
        counts.set(signature, entry);
      }
    }
    const best = [...counts.values()].sort((a, b) => b.count - a.count)[0];
    if (best && best.count >= MIN_SHARED) {
      patterns.push({ metric, changes: best.changes, explained: best.count, breaches: list.length, sentence: sentenceOf(metric, best.changes, best.count, list.length) });
    }
  }
  return patterns.sort((a, b) => b.explained - a.explained || a.metric.localeCompare(b.metric));
}

function sentenceOf(metric: string, changes: Readonly<Record<string, unknown>>, explained: number, breaches: number): string {
  const change = Object.entries(changes)
    .map(([dimension, value]) => `${dimension} ${String(value)}`)
    .join(' and ');
  return `This vendor's ${metric} figures are reproduced with ${change}: ${explained} of ${breaches} breaches explained.`;
}

/**
 * A breach's explanations with the vendor's shared cause for its metric first, when the breach
 * has it among its explanations: of two conventions that both reproduce one figure, the one that
 * reproduces the vendor's other figures is the likelier.
 */
export function sharedCauseFirst<E extends { readonly kind: string; readonly changes?: Readonly<Record<string, unknown>> }>(
  metric: string,
  explanations: readonly E[],
  patterns: readonly VendorPattern[],
): E[] {
  const pattern = patterns.find((p) => p.metric === metric);
  if (!pattern) return [...explanations];
  const signature = JSON.stringify(pattern.changes);
  const shared = explanations.findIndex((e) => e.kind === 'convention' && JSON.stringify(e.changes) === signature);
  if (shared <= 0) return [...explanations];
  return [explanations[shared], ...explanations.slice(0, shared), ...explanations.slice(shared + 1)];
}
