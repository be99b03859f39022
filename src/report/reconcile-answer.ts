import type { Explanation, ReconcileAnswer, ReconcileResult } from '../reconcile/reconcile.js';
import { annualizationOf } from '../metrics/methodology.js';
import type { Cell, ReportSection, ReportView } from './view.js';

/**
 * The reconciliation for people: the vendor-level sentences first, then the breaches with their
 * best explanation, the figures navassay could not compute, and every figure's status. The csv
 * output is one flat row per figure with the explanations as JSON.
 */
export function reconcileView(answer: ReconcileAnswer): ReportView {
  const { summary } = answer;
  const m = answer.methodology;
  const statusCounts = Object.entries(summary.by_status)
    .map(([status, count]) => `${count} ${status}`)
    .join(', ');
  const preface = [
    `Methodology: ${m.frequency} returns, annualised by ${annualizationOf(m)}, ${m.sd_denominator} deviation, ${m.return_type} returns, regression on ${m.regression} returns, alpha ${m.alpha_form}.`,
    `Vendor figures: ${summary.figures} (${statusCounts}).`,
    `Breaches: ${summary.breaches.explained} explained (${summary.breaches.explained_by_data} by repaired data), ${summary.breaches.on_suspect_data} on suspect data, ${summary.breaches.unexplained} unexplained.`,
    ...(summary.unsupported_by_data > 0 ? [`Vendor figures this data cannot support at all: ${summary.unsupported_by_data}.`] : []),
    ...summary.vendor_patterns.map((pattern) => pattern.sentence),
    'An explanation says which convention reproduces the vendor figure, not which convention is right to publish.',
  ];
  const breaches = answer.results.filter((r) => r.status === 'breach');
  const notComputable = answer.results.filter((r) => r.status === 'not_computable');
  const sections: ReportSection[] = [
    {
      heading: 'Breaches',
      columns: ['series', 'as of', 'window', 'metric', 'vendor', 'computed', 'difference', 'tolerance', 'explanation'],
      rows: breaches.map((r) => [r.series_id, r.as_of, r.window, r.metric, r.vendor, r.computed, r.difference, r.tolerance, explanationText(r)]),
    },
    {
      heading: 'Not computable',
      columns: ['series', 'as of', 'window', 'metric', 'vendor', 'unsupported by data', 'reason'],
      rows: notComputable.map((r) => [r.series_id, r.as_of, r.window, r.metric, r.vendor, r.unsupported_by_data ? 'yes' : 'no', r.reason ?? null]),
    },
    {
      heading: 'Every figure',
      columns: ['series', 'as of', 'window', 'metric', 'vendor', 'computed', 'status', 'suspect data'],
      rows: answer.results.map((r) => [r.series_id, r.as_of, r.window, r.metric, r.vendor, r.computed, r.status, (r.suspect_data ?? []).join(' ') || null]),
    },
  ];
  return {
    title: `navassay reconciliation${answer.as_of ? `, as of ${answer.as_of}` : ''}`,
    preface,
    sections,
    emptyText: 'No vendor figures to reconcile.',
    csv: {
      heading: null,
      columns: ['series_id', 'as_of', 'window', 'metric', 'vendor', 'computed', 'difference', 'tolerance', 'status', 'severity', 'reason', 'suspect_data', 'explanations'],
      rows: answer.results.map((r): Cell[] => [
        r.series_id, r.as_of, r.window, r.metric, r.vendor, r.computed, r.difference, r.tolerance, r.status, r.severity,
        r.reason ?? null, (r.suspect_data ?? []).join(' ') || null, r.explanations.length > 0 ? JSON.stringify(r.explanations) : null,
      ]),
    },
  };
}

/** The best explanation in words, with how many more there are; "unexplained" when there is none. */
function explanationText(result: ReconcileResult): string {
  const [best, ...others] = result.explanations;
  if (!best) return 'unexplained';
  const more = others.length > 0 ? ` (+${others.length} more)` : '';
  return describeExplanation(best) + more;
}

export function describeExplanation(explanation: Explanation): string {
  if (explanation.kind === 'convention') {
    const changes = Object.entries(explanation.changes)
      .map(([dimension, value]) => `${dimension}=${String(value)}`)
      .join(', ');
    return `${changes} computes ${round(explanation.computed)}`;
  }
  const { finding } = explanation;
  if (explanation.repair === null) return `data: ${finding.check} ${finding.key} in the window (no repair known)`;
  const outcome = explanation.computed === null ? 'cannot be computed' : `computes ${round(explanation.computed)}`;
  return `data: ${finding.check} ${finding.key}; repaired (${explanation.repair}) it ${outcome}${explanation.reproduces ? ', reproducing the vendor' : ', not the vendor figure'}`;
}

function round(value: number): string {
  return Number(value.toPrecision(6)).toString();
}
