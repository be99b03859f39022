/** A finding: one problem (or notable event) in the feed, as every report and ticket shows it. */
export const SEVERITIES = ['info', 'warning', 'error', 'critical'] as const;
export type Severity = (typeof SEVERITIES)[number];

export interface Finding {
  /** Check identifier, such as `stale_value`. */
  readonly check: string;
  readonly severity: Severity;
  /** The series (or benchmark, or file) the finding is about; null when it concerns a whole file. */
  readonly series_id: string | null;
  /** First and last ISO dates the finding concerns; equal for a single day; null when dateless. */
  readonly start: string | null;
  readonly end: string | null;
  /** One or two sentences a person understands without reading the code. */
  readonly message: string;
  /** The values, dates and line numbers that prove it. */
  readonly evidence: Readonly<Record<string, unknown>>;
  /** Stable across runs for the same problem, so a ticket is raised once. */
  readonly key: string;
}

export function severityRank(severity: Severity): number {
  return SEVERITIES.indexOf(severity);
}

export function isSeverity(text: string): text is Severity {
  return (SEVERITIES as readonly string[]).includes(text);
}

/**
 * The stable key of a finding: its check, its subject and the dates that identify the problem.
 * Built only from facts that do not change when the same problem is seen again tomorrow
 * (never from today's date, line numbers or message wording).
 */
export function findingKey(check: string, subject: string | null, ...identity: Array<string | number | null>): string {
  return [check, subject ?? '*', ...identity.map((part) => (part === null ? '*' : String(part)))].join('|');
}

export interface FindingSummary {
  by_check: Record<string, number>;
  by_severity: Record<Severity, number>;
}

export function summarizeFindings(findings: readonly Finding[]): FindingSummary {
  const by_check: Record<string, number> = {};
  const by_severity: Record<Severity, number> = { info: 0, warning: 0, error: 0, critical: 0 };
  for (const finding of findings) {
    by_check[finding.check] = (by_check[finding.check] ?? 0) + 1;
    by_severity[finding.severity]++;
  }
  return { by_check, by_severity };
}
