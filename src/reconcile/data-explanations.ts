import type { Finding, Severity } from '../findings.js';
import { MetricCalculator, type MetricInputs } from '../metrics/compute.js';
import type { MetricId } from '../metrics/kernels.js';
import type { Methodology } from '../metrics/methodology.js';
import { repairFor } from './data-repairs.js';

/**
 * Data explanations: the figure's window holds an error-level finding, so navassay and the vendor
 * may both be "right" on wrong data. Each names the finding's key and, where the check knows how
 * to repair the suspect values, says whether the figure on repaired data reproduces the vendor's.
 */
export interface DataExplanation {
  readonly kind: 'data';
  readonly finding: { readonly key: string; readonly check: string; readonly severity: Severity; readonly start: string | null; readonly end: string | null };
  /** What the repair changed, or null when the check knows no repair. */
  readonly repair: string | null;
  /** The figure on repaired data (decimal), or null without a repair or when it cannot be computed. */
  readonly computed: number | null;
  /** True when the repaired figure reproduces the vendor's. */
  readonly reproduces: boolean;
}

export interface FigureOnSuspectData {
  readonly seriesId: string;
  readonly asOf: number;
  readonly window: string;
  readonly metric: MetricId;
  readonly methodology: Methodology;
  readonly reproduces: (computed: number) => boolean;
}

/** Recomputes on repaired data, keeping one calculator per repaired finding. */
export class DataExplainer {
  private readonly repaired = new Map<string, { description: string; calculator: MetricCalculator } | null>();

  constructor(private readonly inputs: MetricInputs) {}

  explain(figure: FigureOnSuspectData, findings: readonly Finding[]): DataExplanation[] {
    return findings.map((finding) => {
      const { key, check, severity, start, end } = finding;
      const repair = this.repairOf(finding);
      const computed =
        repair === null || finding.series_id !== figure.seriesId
          ? null
          : repair.calculator.metric({ seriesId: figure.seriesId, asOf: figure.asOf, window: figure.window, metric: figure.metric, methodology: figure.methodology }).value;
      return {
        kind: 'data',
        finding: { key, check, severity, start, end },
        repair: repair?.description ?? null,
        computed,
        reproduces: computed !== null && figure.reproduces(computed),
      };
    });
  }

  private repairOf(finding: Finding) {
    if (!this.repaired.has(finding.key)) {
      const repair = repairFor(finding, this.inputs.nav);
      this.repaired.set(finding.key, repair && { description: repair.description, calculator: new MetricCalculator({ ...this.inputs, nav: repair.nav }) });
    }
    return this.repaired.get(finding.key)!;
  }
}
