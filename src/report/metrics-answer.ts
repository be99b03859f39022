import type { MetricRow, MetricsAnswer } from '../metrics/compute.js';
import type { MetricId } from '../metrics/kernels.js';
import { annualizationOf } from '../metrics/methodology.js';
import type { Cell, ReportSection, ReportView } from './view.js';

/** The two families of figures a reader compares side by side. */
const SECTIONS: ReadonlyArray<{ heading: string; metrics: readonly MetricId[] }> = [
  {
    heading: 'Return and risk of the series',
    metrics: ['return_annualized', 'std_dev', 'downside_deviation', 'max_drawdown', 'sharpe', 'sortino'],
  },
  {
    heading: 'Against its benchmark',
    metrics: ['beta', 'alpha', 'r_squared', 'tracking_error', 'information_ratio', 'treynor'],
  },
];

/**
 * One row per (series, window) and one column per metric, in two sections; figures that cannot be
 * computed show "n/a" (the json and csv outputs give each reason). Four decimals for reading; the
 * json and csv outputs keep full precision, the csv as one flat row per figure.
 */
export function metricsView(answer: MetricsAnswer): ReportView {
  const missing = answer.metrics.filter((figure) => figure.value === null).length;
  const m = answer.methodology;
  return {
    title: `navassay risk figures, as of ${answer.as_of}`,
    preface: [
      `Methodology: ${m.frequency} returns, annualised by ${annualizationOf(m)}, ${m.sd_denominator} deviation, ${m.return_type} returns, regression on ${m.regression} returns, alpha ${m.alpha_form}, risk-free ${describeRiskFree(m.risk_free)}.`,
      `Figures: ${answer.metrics.length - missing} computed, ${missing} not computable. Decimals: 0.1234 is 12.34 %.`,
    ],
    sections: SECTIONS.map(({ heading, metrics }) => pivot(answer.metrics, heading, metrics)).filter((section) => section.columns.length > 2),
    emptyText: 'No series to compute.',
    csv: {
      heading: null,
      columns: ['series_id', 'window', 'metric', 'value', 'observations', 'reason'],
      rows: answer.metrics.map((f) => [f.series_id, f.window, f.metric, f.value, f.observations, f.reason ?? null]),
    },
  };
}

function pivot(figures: readonly MetricRow[], heading: string, wanted: readonly MetricId[]): ReportSection {
  const metrics = wanted.filter((id) => figures.some((figure) => figure.metric === id));
  const rows = new Map<string, Cell[]>();
  for (const figure of figures) {
    const column = metrics.indexOf(figure.metric);
    if (column < 0) continue;
    const key = `${figure.series_id}\u0000${figure.window}`;
    let row = rows.get(key);
    if (!row) rows.set(key, (row = [figure.series_id, figure.window, ...metrics.map(() => null)]));
    row[2 + column] = figure.value === null ? 'n/a' : figure.value.toFixed(4);
  }
  return { heading, columns: ['series', 'window', ...metrics], rows: [...rows.values()] };
}

function describeRiskFree(riskFree: MetricsAnswer['methodology']['risk_free']): string {
  if (riskFree.source === 'none') return 'none (zero)';
  if (riskFree.source === 'constant') return `a constant ${riskFree.annual_rate} a year`;
  return riskFree.rate_id ? `rate series ${riskFree.rate_id}` : "each series' rate_id in the master";
}

