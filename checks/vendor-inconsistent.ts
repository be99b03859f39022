import type { FeedCheck } from '../src/checks/check.js';
import { isoDate, makeFinding } from '../src/checks/support.js';
import type { VendorFigureRecord } from '../src/ingest/records.js';

interface VendorParams {
  /** Ratios smaller than this in absolute value carry no reliable sign. */
  min_ratio_for_sign: number;
  [key: string]: number;
}

/**
 * The vendor's figures judged against each other and against what a figure can be, before any
 * recomputation: an impossible value (a negative deviation, an R² above 1, a drawdown beyond
 * 100 %), the same figure delivered twice with different values, and a Treynor ratio whose sign
 * contradicts the Sharpe ratio's and the beta's (both ratios divide the same mean excess return,
 * so sign(Treynor) = sign(Sharpe) × sign(beta) under any convention). Sortino is left out of the
 * sign rule: with a minimum acceptable return of zero its numerator is not the excess return.
 */
export const vendorInconsistent: FeedCheck<VendorParams> = {
  id: 'vendor_inconsistent',
  scope: 'feed',
  purpose: "The vendor's risk figures contradict each other or what such a figure can be.",
  defaults: { min_ratio_for_sign: 0.1 },
  run(context, params) {
    const figures = context.vendor ?? [];
    const groups = figureGroups(figures);
    return [...impossibleValues(figures), ...conflictingCopies(figures, groups), ...contradictorySigns(figures, groups, params.min_ratio_for_sign)];
  },
};

/** What each metric can be, as decimals (interface.md: r_squared in 0..1, max_drawdown positive). */
const RANGES: Readonly<Record<string, { min: number; max: number; hint: string }>> = {
  std_dev: { min: 0, max: Infinity, hint: 'a standard deviation cannot be negative' },
  downside_deviation: { min: 0, max: Infinity, hint: 'a downside deviation cannot be negative' },
  tracking_error: { min: 0, max: Infinity, hint: 'a tracking error cannot be negative' },
  r_squared: { min: 0, max: 1, hint: 'R² lies between 0 and 1' },
  max_drawdown: { min: 0, max: 1, hint: 'a drawdown lies between 0 and 100 %' },
  return_annualized: { min: -1, max: Infinity, hint: 'a return cannot lose more than 100 %' },
};

function impossibleValues(figures: readonly VendorFigureRecord[]) {
  return figures.flatMap((figure) => {
    const range = RANGES[figure.metric];
    if (!range || (figure.value >= range.min && figure.value <= range.max)) return [];
    const looksPercent = figure.unit === 'decimal' && figure.value > range.max && figure.value / 100 <= range.max;
    const remedy = looksPercent ? '; it looks like a percentage written without unit percent' : '';
    return [
      makeFinding({
        check: 'vendor_inconsistent',
        severity: 'error',
        seriesId: figure.series_id,
        start: figure.as_of,
        end: figure.as_of,
        message: `The vendor's ${figure.window} ${figure.metric} of ${figure.series_id} as of ${isoDate(figure.as_of)} is ${figure.raw_value}, which is impossible: ${range.hint}${remedy}.`,
        evidence: { figure: describe(figure), allowed: { min: range.min, max: range.max } },
        identity: [isoDate(figure.as_of), figure.window, figure.metric, 'impossible'],
      }),
    ];
  });
}

/**
 * The positions of the vendor's figures gathered by series, as-of date and window (a group), each
 * group in the file's order and the groups in the order of their first figure. Keyed through
 * nested maps on the series id (a string of the reader's dictionary, hashed once), the as-of day
 * and the window, so that no key, object or list is made per figure: the standard universe has
 * 180,000 figures in 30,000 groups, and fresh memory is dear (docs/performance.md). A vendor's
 * file lists a group's figures together, so the last group is tried first.
 */
function figureGroups(figures: readonly VendorFigureRecord[]): number[][] {
  const groups: number[][] = [];
  const bySeries = new Map<string, Map<number, Map<string, number[]>>>();
  let last: VendorFigureRecord | undefined;
  let group: number[] = [];
  for (let position = 0; position < figures.length; position++) {
    const figure = figures[position];
    if (!last || figure.series_id !== last.series_id || figure.as_of !== last.as_of || figure.window !== last.window) {
      group = groupOf(bySeries, figure, groups);
      last = figure;
    }
    group.push(position);
  }
  return groups;
}

/** The group of the figure's series, as-of date and window; a new one is added to `groups`. */
function groupOf(bySeries: Map<string, Map<number, Map<string, number[]>>>, figure: VendorFigureRecord, groups: number[][]): number[] {
  let byDate = bySeries.get(figure.series_id);
  if (!byDate) bySeries.set(figure.series_id, (byDate = new Map()));
  let byWindow = byDate.get(figure.as_of);
  if (!byWindow) byDate.set(figure.as_of, (byWindow = new Map()));
  let group = byWindow.get(figure.window);
  if (!group) {
    byWindow.set(figure.window, (group = []));
    groups.push(group);
  }
  return group;
}

/** Groups this small are searched pair by pair for a repeated metric; larger ones through a set. */
const PAIRWISE_GROUP = 16;

/** True when some metric appears twice in the group (most groups hold each metric once). */
function repeatsAMetric(figures: readonly VendorFigureRecord[], group: readonly number[]): boolean {
  if (group.length > PAIRWISE_GROUP) return new Set(group.map((position) => figures[position].metric)).size < group.length;
  for (let i = 1; i < group.length; i++) {
    const metric = figures[group[i]].metric;
    for (let j = 0; j < i; j++) if (figures[group[j]].metric === metric) return true;
  }
  return false;
}

/** The positions of a group's figures by metric: each list in the file's order, the lists in the order of their first figure. */
function copiesByMetric(figures: readonly VendorFigureRecord[], group: readonly number[]): number[][] {
  const byMetric = new Map<string, number[]>();
  for (const position of group) {
    const metric = figures[position].metric;
    const copies = byMetric.get(metric);
    if (copies) copies.push(position);
    else byMetric.set(metric, [position]);
  }
  return [...byMetric.values()];
}

/** The same figure (series, as-of, window, metric) sent with different values, in the order of its first copy. */
function conflictingCopies(figures: readonly VendorFigureRecord[], groups: readonly number[][]) {
  const conflicts: number[][] = [];
  for (const group of groups) {
    if (group.length < 2 || !repeatsAMetric(figures, group)) continue;
    for (const positions of copiesByMetric(figures, group)) if (holdsDifferentValues(positions.map((position) => figures[position]))) conflicts.push(positions);
  }
  return conflicts
    .sort((a, b) => a[0] - b[0])
    .map((positions) => positions.map((position) => figures[position]))
    .map((copies) => {
      const [first] = copies;
      return makeFinding({
        check: 'vendor_inconsistent',
        severity: 'error',
        seriesId: first.series_id,
        start: first.as_of,
        end: first.as_of,
        message: `The vendor sent ${copies.length} different values for the ${first.window} ${first.metric} of ${first.series_id} as of ${isoDate(first.as_of)} (${copies.map((c) => c.raw_value).join(', ')}); only one can be published.`,
        evidence: { figures: copies.map(describe) },
        identity: [isoDate(first.as_of), first.window, first.metric, 'conflict'],
      });
    });
}

/**
 * True when the copies hold two values a `Set` would keep apart (SameValueZero: NaN equals NaN,
 * 0 equals −0): some copy differs from the first, as that relation is an equivalence.
 */
function holdsDifferentValues(copies: readonly VendorFigureRecord[]): boolean {
  const first = copies[0].value;
  for (let i = 1; i < copies.length; i++) {
    const value = copies[i].value;
    if (value !== first && !(value !== value && first !== first)) return true;
  }
  return false;
}

/** The first figure of `metric` in a group. */
function firstOf(figures: readonly VendorFigureRecord[], group: readonly number[], metric: string): VendorFigureRecord | undefined {
  for (const position of group) if (figures[position].metric === metric) return figures[position];
  return undefined;
}

/** Treynor's sign must be Sharpe's times beta's, for one series, window and as-of. */
function contradictorySigns(figures: readonly VendorFigureRecord[], groups: readonly number[][], minRatio: number) {
  const findings = [];
  for (const group of groups) {
    const sharpe = firstOf(figures, group, 'sharpe');
    if (!sharpe || Math.abs(sharpe.value) < minRatio) continue;
    const beta = firstOf(figures, group, 'beta');
    const treynor = firstOf(figures, group, 'treynor');
    if (!beta || !treynor || Math.abs(beta.value) < minRatio || treynor.value === 0) continue;
    if (Math.sign(treynor.value) === Math.sign(sharpe.value) * Math.sign(beta.value)) continue;
    {
      const figure = treynor;
      findings.push(
        makeFinding({
          check: 'vendor_inconsistent',
          severity: 'warning',
          seriesId: sharpe.series_id,
          start: sharpe.as_of,
          end: sharpe.as_of,
          message: `The vendor's ${sharpe.window} ${figure.metric} of ${sharpe.series_id} as of ${isoDate(sharpe.as_of)} (${figure.raw_value}) has the opposite sign to what its Sharpe ratio (${sharpe.raw_value}) and beta (${beta.raw_value}) imply; both ratios rest on the same mean excess return.`,
          evidence: { treynor: describe(figure), sharpe: describe(sharpe), beta: describe(beta) },
          identity: [isoDate(sharpe.as_of), sharpe.window, figure.metric, 'sign'],
        }),
      );
    }
  }
  return findings;
}

function describe(figure: VendorFigureRecord) {
  return { metric: figure.metric, window: figure.window, value: figure.value, as_written: figure.raw_value, unit: figure.unit, line: figure.line };
}
