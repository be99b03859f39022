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
  alpha_form: 'jensen' | 'jensen_geometric' | 'excess_return';
  mar: 'risk_free' | 'zero';
  dd_denominator: 'full' | 'below';
  window_end: number;
  benchmark: string | null;
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

const finiteOrNull = (v: number) => (Number.isFinite(v) ? v : null);

// ---------------------------------------------------------------------------------------------
// The figures

const allNull = (): OracleAnswer => Object.fromEntries(METRICS.map((m) => [m, null])) as OracleAnswer;

export function oracle(input: OracleInput): OracleAnswer {
  const m = input.methodology;
  const A = m.annualization ?? { monthly: 12, weekly: 52, daily: 252 }[m.frequency];
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

  // Benchmark at the same points: its own month-end values at the ends, in between its last level
  // on or before the fund's point (its own holiday carries the level before).
  const benchId = m.benchmark ?? input.benchmarkId;
  const bench = input.benchmarks[benchId] ?? [];
  const benchEnds = monthEndValues(bench, months, input.asOf);
  let rb: number[] | null = null;
  if (benchEnds) {
    let levels: number[];
    if (m.frequency === 'monthly') levels = benchEnds.map((o) => o.value);
    else {
      const firstB = benchEnds[0];
      const lastB = benchEnds[benchEnds.length - 1];
      levels = points.map((p, k) => {
        if (k === 0) return firstB.value;
        if (k === points.length - 1) return lastB.value;
        const upTo = m.frequency === 'weekly' ? isoDate(dayNumber(isoWeekOf(p.date)) + 6) : p.date;
        let level = firstB.value;
        for (const o of bench) if (o.date >= firstB.date && o.date <= upTo && o.date <= lastB.date) level = o.value;
        return level;
      });
    }
    rb = [];
    for (let k = 1; k < levels.length; k++) rb.push(levels[k] / levels[k - 1] - 1);
  }

  // Risk-free return of each period.
  let rf: number[] | null = [];
  const rfSource = input.riskFree;
  if ('constant' in rfSource) rf = r.map(() => rfSource.constant / A);
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
      else rf.push(avg(inPeriod) / A);
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
  out.return_annualized = n >= 1 ? geometric(r, A) : null;
  out.std_dev = enough ? sd(p) * Math.sqrt(A) : null;

  // Max drawdown: every NAV observation from the first month-end value to the last.
  let peak = -Infinity;
  let deepest = 0;
  for (const o of input.fund) {
    if (o.date < first.date || o.date > last.date) continue;
    peak = Math.max(peak, o.value);
    deepest = Math.max(deepest, 1 - o.value / peak);
  }
  out.max_drawdown = deepest;

  const marOf = (k: number) => (m.mar === 'zero' ? 0 : rf![k]);
  if (rf || m.mar === 'zero') {
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
    out.sortino = dd > 0 ? (A * meanOverMar) / dd : null;
  }

  if (rf) {
    const ep = p.map((v, k) => v - rf![k]);
    out.sharpe = enough ? finiteOrNull((avg(ep) / sd(ep)) * Math.sqrt(A)) : null;
  }

  if (b) {
    const active = p.map((v, k) => v - b[k]);
    const te = enough ? sd(active) * Math.sqrt(A) : null;
    out.tracking_error = te;
    out.information_ratio = te ? (A * avg(active)) / te : null;

    // The regression: excess returns, or raw returns with `regression: raw`.
    const x = m.regression === 'raw' ? b : rf && b.map((v, k) => v - rf![k]);
    const y = m.regression === 'raw' ? p : rf && p.map((v, k) => v - rf![k]);
    let beta: number | null = null;
    if (x && y && n >= 2) {
      beta = finiteOrNull(cov(x, y, population) / cov(x, x, population));
      out.beta = beta;
      out.r_squared = finiteOrNull(cov(x, y, population) ** 2 / (cov(x, x, population) * cov(y, y, population)));
      if (m.alpha_form === 'jensen' && beta !== null) out.alpha = A * (avg(y) - beta * avg(x));
    }
    if (m.alpha_form === 'excess_return') out.alpha = geometric(r, A) - geometric(rb!, A);
    if (m.alpha_form === 'jensen_geometric' && rf && beta !== null) {
      const gf = geometric(rf, A);
      out.alpha = geometric(r, A) - gf - beta * (geometric(rb!, A) - gf);
    }
    if (rf && beta !== null && beta !== 0) out.treynor = (A * avg(p.map((v, k) => v - rf![k]))) / beta;
  }
  return out;
}
