import { join } from 'node:path';
import { QUARANTINE_FILE, reportFileName } from '../../config/output-paths.js';
import { writeFileAtomically, writeQuarantine } from '../../report/files.js';
import type { MetricsAnswer } from '../../metrics/compute.js';
import { checkView, type CheckAnswer } from '../../report/check-answer.js';
import { metricsView } from '../../report/metrics-answer.js';
import type { ReconcileAnswer } from '../../reconcile/reconcile.js';
import { reconcileView } from '../../report/reconcile-answer.js';
import { render, type OutputFormat } from '../../report/render.js';
import type { Day } from '../day.js';

export interface ReportPlace {
  readonly dir: string;
  readonly formats: readonly OutputFormat[];
}

/** What the earlier stages answered, for the answers stage to write. */
export interface StageAnswers {
  readonly check: CheckAnswer;
  readonly metrics: MetricsAnswer | null;
  readonly reconciliation: ReconcileAnswer | null;
}

/** The answers stage: each report in each configured format, and the quarantine; returns the paths written. */
export function answersStage(day: Day, answers: StageAnswers, place: ReportPlace): string[] {
  const { check, metrics, reconciliation } = answers;
  const written: string[] = [];
  const write = (name: string, text: string) => {
    const path = join(place.dir, name);
    writeFileAtomically(path, text);
    written.push(path);
  };
  for (const format of place.formats) {
    write(reportFileName('check', format), render(format, check, checkView(check)));
    if (metrics) write(reportFileName('metrics', format), render(format, metrics, metricsView(metrics)));
    if (reconciliation) write(reportFileName('reconcile', format), render(format, reconciliation, reconcileView(reconciliation)));
  }
  const quarantine = join(place.dir, QUARANTINE_FILE);
  writeQuarantine(quarantine, day.feed.rejected);
  written.push(quarantine);
  return written;
}
