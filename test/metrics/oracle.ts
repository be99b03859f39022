/**
 * A deliberately naive re-implementation of interface.md's "Default methodology (monthly)" and of
 * "How each non-default value changes the computation", written from that text (and, where the
 * text leaves a choice, from the readings documented in docs/methodology.md under "Readings of
 * the interface where its text leaves a choice"). It imports nothing from src/: dates are ISO
 * strings, series are plain arrays, months are grouped by their `YYYY-MM` prefix, and every mean,
 * variance and covariance is a plain loop.
 */

export interface Obs {
  readonly date: string; // YYYY-MM-DD
  readonly value: number;
}

export interface OracleMethodology {
  frequency: 'monthly' | 'weekly' | 'daily';
  annualization: number | null;
  sd_denominator: 'sample' | 'population';
  return_type: 'simple' | 'log';
  regression: 'excess' | 'raw';
  alpha_form: 'jensen' | 'jensen_geometric' | 'excess_return' | 'compounded';
  mar: 'risk_free' | 'zero' | number;
  dd_denominator: 'full' | 'below';
  window_end: number;
  benchmark: string | null;
  rate_periods: 'frequency' | 'annualization';
  rate_conversion: 'simple' | 'compound';
  drawdown: 'every_nav' | 'sampled';
  ratio_scale: 'annualized' | 'per_period';
  return_annualization: 'periods' | 'calendar_days';
}

export const ORACLE_DEFAULT: OracleMethodology = {
  frequency: 'monthly',
  annualization: null,
  sd_denominator: 'sample',
  return_type: 'simple',
  regression: 'excess',
  alpha_form: 'jensen',
  mar: 'risk_free',
  dd_denominator: 'full',
  window_end: 0,
  benchmark: null,
  rate_periods: 'frequency',
  rate_conversion: 'simple',
  drawdown: 'every_nav',
  ratio_scale: 'annualized',
  return_annualization: 'periods',
};

export type OracleRiskFree = { constant: number } | { rates: Obs[] } | { none: true };

export interface OracleInput {
  fund: Obs[];
  /** Benchmark levels by id. */
  benchmarks: Record<string, Obs[]>;
  /** The benchmark the master maps the fund to. */
  benchmarkId: string;
  riskFree: OracleRiskFree;
  asOf: string;
  /** Window length in months. */
  months: number;
  methodology: OracleMethodology;
}

export const METRICS = [
  'return_annualized',
  'std_dev',
  'downside_deviation',
  'beta',
  'alpha',
  'r_squared',
  'sharpe',
  'sortino',
  'tracking_error',
  'information_ratio',
  'treynor',
  'max_drawdown',
] as const;
export type Metric = (typeof METRICS)[number];

/** Every metric's value, or null when the oracle finds it not computable. */
export type OracleAnswer = Record<Metric, number | null>;

// ---------------------------------------------------------------------------------------------
// Calendar, the naive way

export function dayNumber(date: string): number {
  return Date.UTC(Number(date.slice(0, 4)), Number(date.slice(5, 7)) - 1, Number(date.slice(8, 10))) / 86_400_000;
}

export function isoDate(day: number): string {
  return new Date(day * 86_400_000).toISOString().slice(0, 10);
}

/** `YYYY-MM` shifted by a number of months. */
export function shiftMonth(month: string, by: number): string {
  const total = Number(month.slice(0, 4)) * 12 + Number(month.slice(5, 7)) - 1 + by;
  const year = Math.floor(total / 12);
  return `${String(year).padStart(4, '0')}-${String((total % 12) + 1).padStart(2, '0')}`;
}

/** The Monday of the ISO week a date falls in, as an ISO date. */
export function isoWeekOf(date: string): string {
  const day = dayNumber(date);
  const weekday = new Date(day * 86_400_000).getUTCDay(); // 0 = Sunday
  return isoDate(day - ((weekday + 6) % 7));
}

// ---------------------------------------------------------------------------------------------
// Month-end values and the window

/** The last observation inside the month, not after the as-of day; undefined when there is none. */
export function monthEndObs(series: Obs[], month: string, asOf: string): Obs | undefined {
  let found: Obs | undefined;
  for (const o of series) if (o.date.slice(0, 7) === month && o.date <= asOf) found = o;
  return found;
}

function monthEndValues(series: Obs[], months: string[], asOf: string): Obs[] | null {
  const values: Obs[] = [];
  for (const month of months) {
    const o = monthEndObs(series, month, asOf);
    if (!o || !(o.value > 0)) return null;
    values.push(o);
  }
  return values;
}

// ---------------------------------------------------------------------------------------------
// Plain statistics

const sum = (x: number[]) => x.reduce((s, v) => s + v, 0);
const avg = (x: number[]) => sum(x) / x.length;

function cov(x: number[], y: number[], population: boolean): number {
  const mx = avg(x);
  const my = avg(y);
  let s = 0;
  for (let i = 0; i < x.length; i++) s += (x[i] - mx) * (y[i] - my);
  return s / (population ? x.length : x.length - 1);
}

function geometric(returns: number[], A: number): number {
  let growth = 1;
  for (const r of returns) growth *= 1 + r;
  return growth ** (A / returns.length) - 1;
}

/** Compounded over calendar time: (Π(1 + r))^(365.25 / days) − 1. */
function geometricOverDays(returns: number[], days: number): number {
  let growth = 1;
  for (const r of returns) growth *= 1 + r;
  return growth ** (365.25 / days) - 1;
}

/** Largest fall from a running peak of a list of values. */
function deepestFall(values: number[]): number {
  let peak = -Infinity;
  let deepest = 0;
  for (const v of values) {
    peak = Math.max(peak, v);
    deepest = Math.max(deepest, 1 - v / peak);
  }
  return deepest;
}

const finiteOrNull = (v: number) => (Number.isFinite(v) ? v : null);

// ---------------------------------------------------------------------------------------------
// The figures

const allNull = (): OracleAnswer => Object.fromEntries(METRICS.map((m) => [m, null])) as OracleAnswer;

export function oracle(input: OracleInput): OracleAnswer {
  const m = input.methodology;
  const A = m.annualization ?? { monthly: 12, weekly: 52, daily: 252 }[m.frequency];
  // interface.md: the per-period rate follows the frequency (annual / 12 monthly) whatever A says;
  // `rate_periods: annualization` spreads it over A instead, `rate_conversion: compound` compounds.
  const P = m.rate_periods === 'annualization' ? A : { monthly: 12, weekly: 52, daily: 252 }[m.frequency];
  const perPeriod = (annual: number) => (m.rate_conversion === 'compound' ? (1 + annual) ** (1 / P) - 1 : annual / P);
  const lastMonth = shiftMonth(input.asOf.slice(0, 7), m.window_end);
  const months = Array.from({ length: input.months + 1 }, (_, k) => shiftMonth(lastMonth, k - input.months));

  const fundEnds = monthEndValues(input.fund, months, input.asOf);
  if (!fundEnds) return allNull();
  const first = fundEnds[0];
  const last = fundEnds[fundEnds.length - 1];

  // Sample points of the fund.
  let points: Obs[];
  if (m.frequency === 'monthly') {
    points = fundEnds;
  } else {
    const inside = input.fund.filter((o) => o.date > first.date && o.date <= last.date);
    const key = (o: Obs) => (m.frequency === 'weekly' ? isoWeekOf(o.date) : o.date);
    points = [first];
    for (let i = 0; i < inside.length; i++) {
      if (i === inside.length - 1 || key(inside[i + 1]) !== key(inside[i])) points.push(inside[i]);
    }
  }
  if (points.some((o) => !(o.value > 0))) return allNull();
  const r: number[] = [];
  for (let k = 1; k < points.length; k++) r.push(points[k].value / points[k - 1].value - 1);
  const n = r.length;

  // Benchmark on the fund's own sample dates (docs/methodology.md): its latest level on or before
  // each fund point, never earlier than the level read at the point before. At a month-end point
  // (every monthly point, the window's two ends otherwise) that level must be in the same month;
  // with none there, the benchmark's own month-end value of that month.
  const benchId = m.benchmark ?? input.benchmarkId;
  const bench = input.benchmarks[benchId] ?? [];
  const benchEnds = monthEndValues(bench, months, input.asOf);
  let rb: number[] | null = null;
  if (benchEnds) {
    const read: Obs[] = [];
    points.forEach((p, k) => {
      const earlier = bench.filter((o) => o.date <= p.date);
      let latest = earlier[earlier.length - 1];
      const monthPoint = m.frequency === 'monthly' ? k : k === 0 ? 0 : k === points.length - 1 ? months.length - 1 : -1;
      if (monthPoint >= 0) {
        if (!latest || latest.date.slice(0, 7) !== months[monthPoint]) latest = benchEnds[monthPoint];
      } else if (!latest || latest.date < read[k - 1].date) latest = read[k - 1];
      read.push(latest);
    });
    if (read.every((o) => o.value > 0)) {
      rb = [];
      for (let k = 1; k < read.length; k++) rb.push(read[k].value / read[k - 1].value - 1);
    }
  }

  // Risk-free return of each period.
  let rf: number[] | null = [];
  const rfSource = input.riskFree;
  if ('constant' in rfSource) rf = r.map(() => perPeriod(rfSource.constant));
  else if ('none' in rfSource) rf = r.map(() => 0);
  else {
    const rates = rfSource.rates.filter((o) => o.date <= input.asOf);
    for (let k = 1; k < points.length && rf; k++) {
      let inPeriod: number[];
      if (m.frequency === 'monthly') {
        inPeriod = rates.filter((o) => o.date.slice(0, 7) === months[k]).map((o) => o.value);
      } else {
        // Weekly and daily (documented reading): the rates observed on the days the return covers,
        // after its start point up to its end point; with none, the latest earlier rate if it was
        // observed within the 31 days before the period's end.
        inPeriod = rates.filter((o) => o.date > points[k - 1].date && o.date <= points[k].date).map((o) => o.value);
        if (inPeriod.length === 0) {
          const earlier = rates.filter((o) => o.date <= points[k - 1].date);
          const latest = earlier[earlier.length - 1];
          if (latest && dayNumber(points[k].date) - dayNumber(latest.date) <= 31) inPeriod = [latest.value];
        }
      }
      if (inPeriod.length === 0) rf = null;
      else rf.push(perPeriod(avg(inPeriod)));
    }
  }

  const population = m.sd_denominator === 'population';
  const ln = (x: number[]) => x.map((v) => Math.log(1 + v));
  // Returns as every mean, deviation, regression and ratio sees them.
  const p = m.return_type === 'log' ? ln(r) : r;
  const b = rb && (m.return_type === 'log' ? ln(rb) : rb);
  const sd = (x: number[]) => Math.sqrt(cov(x, x, population));
  const enough = population ? n >= 1 : n >= 2;

  const out = allNull();
  const days = dayNumber(last.date) - dayNumber(first.date);
  const annualized = (x: number[]) => (m.return_annualization === 'calendar_days' ? geometricOverDays(x, days) : geometric(x, A));
  // Ratios: annualised by √A (Treynor, a return per unit of beta, by A), or per period.
  const rootA = m.ratio_scale === 'per_period' ? 1 : Math.sqrt(A);
  const byA = m.ratio_scale === 'per_period' ? 1 : A;
  out.return_annualized = n >= 1 ? annualized(r) : null;
  out.std_dev = enough ? sd(p) * Math.sqrt(A) : null;

  // Max drawdown: every NAV observation from the first month-end value to the last, or the sample points.
  const path = m.drawdown === 'sampled' ? points : input.fund.filter((o) => o.date >= first.date && o.date <= last.date);
  out.max_drawdown = deepestFall(path.map((o) => o.value));

  const fixedMar = typeof m.mar === 'number' ? m.mar : null;
  const marOf = (k: number) => (fixedMar !== null ? perPeriod(fixedMar) : m.mar === 'zero' ? 0 : rf![k]);
  if (rf || m.mar !== 'risk_free') {
    let squares = 0;
    let below = 0;
    for (let k = 0; k < n; k++) {
      const d = p[k] - marOf(k);
      if (d < 0) {
        squares += d * d;
        below++;
      }
    }
    const count = m.dd_denominator === 'full' ? n : Math.max(below, 1);
    const dd = Math.sqrt(squares / count) * Math.sqrt(A);
    out.downside_deviation = dd;
    const meanOverMar = avg(p.map((v, k) => v - marOf(k)));
    const ddPerPeriod = Math.sqrt(squares / count);
    out.sortino = dd > 0 ? (meanOverMar / ddPerPeriod) * rootA : null;
  }

  if (rf) {
    const ep = p.map((v, k) => v - rf![k]);
    out.sharpe = enough ? finiteOrNull((avg(ep) / sd(ep)) * rootA) : null;
  }

  if (b) {
    const active = p.map((v, k) => v - b[k]);
    const te = enough ? sd(active) * Math.sqrt(A) : null;
    out.tracking_error = te;
    out.information_ratio = te ? (avg(active) / sd(active)) * rootA : null;

    // The regression: excess returns, or raw returns with `regression: raw`.
    const x = m.regression === 'raw' ? b : rf && b.map((v, k) => v - rf![k]);
    const y = m.regression === 'raw' ? p : rf && p.map((v, k) => v - rf![k]);
    let beta: number | null = null;
    if (x && y && n >= 2) {
      beta = finiteOrNull(cov(x, y, population) / cov(x, x, population));
      out.beta = beta;
      out.r_squared = finiteOrNull(cov(x, y, population) ** 2 / (cov(x, x, population) * cov(y, y, population)));
      if (m.alpha_form === 'jensen' && beta !== null) out.alpha = A * (avg(y) - beta * avg(x));
      if (m.alpha_form === 'compounded' && beta !== null) out.alpha = (1 + (avg(y) - beta * avg(x))) ** A - 1;
    }
    if (m.alpha_form === 'excess_return') out.alpha = annualized(r) - annualized(rb!);
    if (m.alpha_form === 'jensen_geometric' && rf && beta !== null) {
      const gf = annualized(rf);
      out.alpha = annualized(r) - gf - beta * (annualized(rb!) - gf);
    }
    if (rf && beta !== null && beta !== 0) out.treynor = (byA * avg(p.map((v, k) => v - rf![k]))) / beta;
  }
  return out;
}
