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
    return [...impossibleValues(figures), ...conflictingCopies(figures), ...contradictorySigns(figures, params.min_ratio_for_sign)];
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

function conflictingCopies(figures: readonly VendorFigureRecord[]) {
  const byKey = new Map<string, VendorFigureRecord[]>();
  for (const figure of figures) {
    const key = [figure.series_id, figure.as_of, figure.window, figure.metric].join('|');
    const copies = byKey.get(key);
    if (copies) copies.push(figure);
    else byKey.set(key, [figure]);
  }
  return [...byKey.values()]
    .filter(holdsDifferentValues)
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

/** Treynor's sign must be Sharpe's times beta's, for one series, window and as-of. */
function contradictorySigns(figures: readonly VendorFigureRecord[], minRatio: number) {
  const groups = new Map<string, Map<string, VendorFigureRecord>>();
  for (const figure of figures) {
    const key = [figure.series_id, figure.as_of, figure.window].join('|');
    const group = groups.get(key) ?? new Map<string, VendorFigureRecord>();
    if (!group.has(figure.metric)) group.set(figure.metric, figure);
    groups.set(key, group);
  }
  const findings = [];
  for (const group of groups.values()) {
    const sharpe = group.get('sharpe');
    if (!sharpe || Math.abs(sharpe.value) < minRatio) continue;
    const beta = group.get('beta');
    const treynor = group.get('treynor');
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
