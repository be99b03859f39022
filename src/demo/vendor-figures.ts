import { formatIsoDate } from '../calendar/days.js';
import { toCorporateActions, toMasterRecords, toSeriesFrame } from '../ingest/convert.js';
import { readCsvBuffer } from '../ingest/csv-reader.js';
import { DEFAULT_PROFILE, FeedProfileSchema } from '../ingest/profile.js';
import type { MetricId } from '../ingest/schema.js';
import { computeMetrics, type MetricRow } from '../metrics/compute.js';
import { DEFAULT_METHODOLOGY, withChanges, type MethodologyChanges } from '../metrics/methodology.js';
import { figureInputs } from '../job/day.js';

/**
 * The demo vendor's file of published risk figures. Most figures are what an honest vendor would
 * print (the default methodology, rounded to the printed precision); some carry the convention
 * differences and slips that a data team meets:
 *
 * - NVA0001's standard deviation uses the population (n) denominator;
 * - NVA0002's figures are written in percent, with unit `percent`;
 * - NVA0003's R² is written as a percentage but labelled `decimal`;
 * - NVA0007's Treynor ratio has the wrong sign;
 * - NVA0010's beta is delivered twice with two values;
 * - NVA0003 also has a 10-year standard deviation, which six years of history cannot support.
 */
const PUBLISHED: readonly MetricId[] = ['return_annualized', 'std_dev', 'beta', 'alpha', 'r_squared', 'sharpe', 'sortino', 'treynor', 'max_drawdown'];
const SERIES = ['NVA0001', 'NVA0002', 'NVA0003', 'NVA0005', 'NVA0007', 'NVA0010'];
const WINDOWS = ['1y', '3y'];
/** Printed as plain ratios to two decimals; the other figures are returns or risks, to four. */
const RATIOS = new Set<string>(['beta', 'r_squared', 'sharpe', 'sortino']);

const CONVENTIONS: Readonly<Record<string, MethodologyChanges>> = { NVA0001: { sd_denominator: 'population' } };

interface DemoInputs {
  readonly nav: string;
  readonly benchmarks: string;
  readonly master: string;
  readonly rates: string;
  readonly actions: string;
}

export function vendorFile(inputs: DemoInputs, asOf: number): string {
  const lines = ['series_id,as_of,window,metric,value,unit'];
  for (const figure of publishedFigures(inputs, asOf)) lines.push(...vendorLines(figure, formatIsoDate(asOf)));
  lines.push(`NVA0003,${formatIsoDate(asOf)},10y,std_dev,0.1437,decimal`);
  return lines.join('\n') + '\n';
}

/** The figures of SERIES, each under its own convention (the default unless CONVENTIONS says otherwise). */
function publishedFigures(inputs: DemoInputs, asOf: number): MetricRow[] {
  const read = (text: string, kind: 'nav' | 'benchmarks' | 'master' | 'rates' | 'actions', profile = DEFAULT_PROFILE) =>
    readCsvBuffer(Buffer.from(text), `${kind}.csv`, kind, profile).table;
  const indexVendor = FeedProfileSchema.parse({ columns: { benchmark_id: 'Index Code', date: 'Value Date', level: 'Close' }, delimiter: ';', decimal: ',', date_format: 'day-first' });
  const data = figureInputs({
    nav: toSeriesFrame(read(inputs.nav, 'nav'), 'nav'),
    actions: toCorporateActions(read(inputs.actions, 'actions')),
    benchmarks: toSeriesFrame(read(inputs.benchmarks, 'benchmarks', indexVendor), 'benchmarks'),
    master: toMasterRecords(read(inputs.master, 'master')),
    rates: toSeriesFrame(read(inputs.rates, 'rates'), 'rates'),
  })!;
  const under = (changes: MethodologyChanges) =>
    computeMetrics({ ...data, asOf, windows: WINDOWS, methodology: withChanges(DEFAULT_METHODOLOGY, changes), metrics: PUBLISHED }).metrics;
  const figuresByConvention = new Map<MethodologyChanges, MetricRow[]>();
  return SERIES.flatMap((id) => {
    const changes = CONVENTIONS[id] ?? NO_CHANGES;
    if (!figuresByConvention.has(changes)) figuresByConvention.set(changes, under(changes));
    return figuresByConvention.get(changes)!.filter((figure) => figure.series_id === id && figure.value !== null);
  });
}

const NO_CHANGES: MethodologyChanges = {};

/** A figure as the vendor prints it: ratios to two decimals, returns and risks to two decimals of a percent. */
function vendorLines(figure: MetricRow, asOf: string): string[] {
  const value = figure.value!;
  const line = (text: string, unit: 'decimal' | 'percent') => `${figure.series_id},${asOf},${figure.window},${figure.metric},${text},${unit}`;
  if (figure.series_id === 'NVA0003' && figure.metric === 'r_squared') return [line((value * 100).toFixed(2), 'decimal')];
  if (figure.series_id === 'NVA0007' && figure.metric === 'treynor') return [line((-value).toFixed(4), 'decimal')];
  if (figure.series_id === 'NVA0010' && figure.metric === 'beta' && figure.window === '3y') {
    return [line(value.toFixed(2), 'decimal'), line((value + 0.07).toFixed(2), 'decimal')];
  }
  if (RATIOS.has(figure.metric)) return [line(value.toFixed(2), 'decimal')];
  if (figure.series_id === 'NVA0002') return [line((value * 100).toFixed(2), 'percent')];
  return [line(value.toFixed(4), 'decimal')];
}
