import { formatIsoDate } from '../calendar/days.js';
import { severityRank, summarizeFindings, type Finding, type FindingSummary } from '../findings.js';
import type { RowAccounting } from '../ingest/records.js';
import { tableView, type ReportView } from './view.js';

/** The `check --format json` answer of docs/interface.md. */
export interface CheckAnswer {
  readonly as_of: string;
  readonly rows: RowAccounting;
  readonly findings: readonly Finding[];
  readonly summary: FindingSummary;
  /** `run` only, when earlier store snapshots could not be read: each date and why, oldest first. */
  readonly skipped_snapshots?: ReadonlyArray<{ readonly as_of: string; readonly reason: string }>;
}

export function checkAnswer(asOf: number, rows: RowAccounting, findings: readonly Finding[]): CheckAnswer {
  return { as_of: formatIsoDate(asOf), rows, findings, summary: summarizeFindings(findings) };
}

/** Most severe first, then by series and date, so the first screen holds what matters. */
export function checkView(answer: CheckAnswer): ReportView {
  const ordered = [...answer.findings].sort(
    (a, b) =>
      severityRank(b.severity) - severityRank(a.severity) ||
      (a.series_id ?? '').localeCompare(b.series_id ?? '') ||
      (a.start ?? '').localeCompare(b.start ?? ''),
  );
  const severities = Object.entries(answer.summary.by_severity)
    .filter(([, count]) => count > 0)
    .map(([severity, count]) => `${count} ${severity}`)
    .join(', ');
  const view = tableView(
    `navassay feed check, as of ${answer.as_of}`,
    [
      `Rows read ${answer.rows.read}: ${answer.rows.accepted} accepted, ${answer.rows.rejected} rejected.`,
      `Findings: ${answer.findings.length}${severities ? ` (${severities})` : ''}.`,
    ],
    ['severity', 'check', 'series', 'from', 'to', 'message'],
    ordered.map((f) => [f.severity, f.check, f.series_id, f.start, f.end, f.message]),
    'No findings: every check passed.',
  );
  // The csv output feeds ticket imports and spreadsheets: every field of a finding, evidence as JSON.
  const csv = {
    heading: null,
    columns: ['check', 'severity', 'series_id', 'start', 'end', 'message', 'key', 'evidence'],
    rows: ordered.map((f) => [f.check, f.severity, f.series_id, f.start, f.end, f.message, f.key, JSON.stringify(f.evidence)]),
  };
  return { ...view, csv };
}

/** Exit status 1 when a finding is at or above the fail-on severity. */
export function failsOn(findings: readonly Finding[], failOn: string): boolean {
  if (failOn === 'none') return false;
  const threshold = severityRank(failOn as Finding['severity']);
  return findings.some((finding) => severityRank(finding.severity) >= threshold);
}
