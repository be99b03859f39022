import type { MetricsAnswer } from '../metrics/compute.js';
import { METRIC_IDS } from '../metrics/kernels.js';
import { annualizationOf } from '../metrics/methodology.js';
import type { ReportView } from './view.js';

/** One row per (series, window) and one column per metric; figures that cannot be computed show "n/a". */
export function metricsView(answer: MetricsAnswer): ReportView {
  const metricIds = METRIC_IDS.filter((id) => answer.metrics.some((row) => row.metric === id));
  const rows = new Map<string, Array<string | number | null>>();
  let missing = 0;
  for (const figure of answer.metrics) {
    const key = `${figure.series_id}\u0000${figure.window}`;
    let row = rows.get(key);
    if (!row) rows.set(key, (row = [figure.series_id, figure.window, ...metricIds.map(() => null)]));
    row[2 + metricIds.indexOf(figure.metric)] = figure.value === null ? 'n/a' : round(figure.value);
    if (figure.value === null) missing++;
  }
  const m = answer.methodology;
  return {
    title: `navassay risk figures, as of ${answer.as_of}`,
    preface: [
      `Methodology: ${m.frequency} returns, annualised by ${annualizationOf(m)}, ${m.sd_denominator} deviation, ${m.return_type} returns, regression on ${m.regression} returns, alpha ${m.alpha_form}, risk-free ${describeRiskFree(m.risk_free)}.`,
      `Figures: ${answer.metrics.length - missing} computed, ${missing} not computable (the json output gives each reason). Decimals: 0.1234 is 12.34 %.`,
    ],
    columns: ['series', 'window', ...metricIds],
    rows: [...rows.values()],
    emptyText: 'No series to compute.',
  };
}

function describeRiskFree(riskFree: MetricsAnswer['methodology']['risk_free']): string {
  if (riskFree.source === 'none') return 'none (zero)';
  if (riskFree.source === 'constant') return `a constant ${riskFree.annual_rate} a year`;
  return riskFree.rate_id ? `rate series ${riskFree.rate_id}` : "each series' rate_id in the master";
}

function round(value: number): number {
  return Math.round(value * 1e6) / 1e6;
}
