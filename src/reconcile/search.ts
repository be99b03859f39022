import type { MetricCalculator } from '../metrics/compute.js';
import type { Methodology } from '../metrics/methodology.js';
import { candidatesFor, SCALE, type Candidate, type CandidateContext } from './candidates.js';

/**
 * The convention search: which changes to the configured methodology make navassay compute the
 * vendor's figure? One change at a time first; pairs only when no single change does. Every
 * variant is arithmetic on the calculator's cached window statistics, except the changes that
 * resample the window (frequency, window_end, benchmark, annualization), which are cached in
 * turn, so the search costs little beyond the first figure of a series.
 */

/** What an explanation changes and what navassay then computes (in the vendor's reading). */
export interface ConventionExplanation {
  readonly kind: 'convention';
  readonly changes: Readonly<Record<string, unknown>>;
  readonly computed: number;
}

export interface FigureToExplain extends Omit<CandidateContext, 'base'> {
  readonly seriesId: string;
  readonly asOf: number;
  readonly window: string;
  readonly methodology: Methodology;
  /** The vendor's figure as read (a decimal, its unit applied). */
  readonly vendor: number;
  /** The configured methodology's figure. */
  readonly computed: number;
  /** The difference the figure's tolerance allows, and half a unit of its printed precision. */
  readonly allowed: (computed: number) => number;
  readonly halfUnit: number;
}

interface Tried {
  readonly changes: readonly Candidate[];
  readonly computed: number;
  /** How the vendor's reading scales a decimal: 1, or 100 and 1/100 for a misread scale. */
  readonly factor: number;
  /** The candidate's figure in the vendor's reading (computed × factor), for comparison with `vendor`. */
  readonly asRead: number;
}

/**
 * A figure printed with fewer than two significant digits (0.0006, 0.8) lies within its own half
 * unit of a wide band of values: conventions cannot be told apart on it, so none is searched.
 */
export function tellsConventionsApart(vendor: number, halfUnit: number): boolean {
  return Math.abs(vendor) >= 20 * halfUnit;
}

/** Pairs, a few hundred of them, need a figure printed to at least three significant digits. */
function tellsPairsApart(vendor: number, halfUnit: number): boolean {
  return Math.abs(vendor) >= 200 * halfUnit;
}

/**
 * `rate_periods: annualization` spreads the rate over A periods: with the frequency's own A it
 * changes nothing alone, yet with another annualisation it is the vendor's reading
 * (docs/methodology.md), so it is kept for the pairs.
 */
const ACTS_WITH_ANOTHER = new Set(['rate_periods']);

export function searchConventions(calculator: MetricCalculator, figure: FigureToExplain): ConventionExplanation[] {
  if (!tellsConventionsApart(figure.vendor, figure.halfUnit)) return [];
  const candidates = candidatesFor({ ...figure, base: figure.methodology });
  const singles: Tried[] = [];
  for (const candidate of candidates) {
    const tried = attempt(calculator, figure, [candidate]);
    // A change that leaves the figure as it was cannot help a pair either, unless it acts through another dimension.
    if (tried && (tried.asRead !== figure.computed || ACTS_WITH_ANOTHER.has(candidate.dimension))) singles.push(tried);
  }
  let found = singles.filter((tried) => isReproduced(tried, figure));
  if (found.length === 0 && tellsPairsApart(figure.vendor, figure.halfUnit)) found = searchPairs(calculator, figure, singles);
  return rank(found, figure).map(toExplanation);
}

function searchPairs(calculator: MetricCalculator, figure: FigureToExplain, singles: readonly Tried[]): Tried[] {
  const found: Tried[] = [];
  for (let i = 0; i < singles.length; i++) {
    for (let j = i + 1; j < singles.length; j++) {
      const [a] = singles[i].changes;
      const [b] = singles[j].changes;
      if (a.dimension === b.dimension) continue;
      const tried = attempt(calculator, figure, [a, b]);
      if (tried && isReproducedStrictly(tried, figure)) found.push(tried);
    }
  }
  return found;
}

/** The figure under the changes, or null when it cannot be computed so. */
function attempt(calculator: MetricCalculator, figure: FigureToExplain, changes: readonly Candidate[]): Tried | null {
  const scale = changes.find((change) => change.dimension === SCALE)?.value;
  const methodology = methodologyWith(figure.methodology, changes.filter((change) => change.dimension !== SCALE));
  const computed = methodology === figure.methodology ? figure.computed : valueOf(calculator, figure, methodology);
  if (computed === null) return null;
  const factor = readingFactor(scale, figure.unit);
  return { changes, computed, factor, asRead: computed * factor };
}

function valueOf(calculator: MetricCalculator, figure: FigureToExplain, methodology: Methodology): number | null {
  return calculator.variantMetric({ seriesId: figure.seriesId, asOf: figure.asOf, window: figure.window, metric: figure.metric, methodology }).value;
}

/** A changed frequency annualises by its own default unless the annualization is changed too. */
function methodologyWith(base: Methodology, changes: readonly Candidate[]): Methodology {
  if (changes.length === 0) return base;
  const next: Record<string, unknown> = { ...base };
  for (const { dimension, value } of changes) next[dimension] = value;
  if (changes.some((c) => c.dimension === 'frequency') && !changes.some((c) => c.dimension === 'annualization')) next.annualization = null;
  return next as unknown as Methodology;
}

/**
 * What the vendor's number would be, read as navassay reads it, had the vendor computed
 * `computed` and written it in `scale`: a vendor writing percent under a decimal unit shows 100
 * times the decimal; one writing decimals under a percent unit shows a hundredth of it.
 */
function readingFactor(scale: unknown, unit: 'decimal' | 'percent'): number {
  if (scale === 'percent' && unit === 'decimal') return 100;
  if (scale === 'decimal' && unit === 'percent') return 1 / 100;
  return 1;
}

/**
 * An explanation must give the vendor's printed figure: within half a unit of its last printed
 * digit (so honest rounding of the convention's figure passes), or a tenth of the tolerance when
 * the vendor printed finer than that (numeric noise between two correct implementations lies far
 * below it). Not the whole tolerance: on figures printed to four decimals, a basis point of
 * tolerance let a shifted window or another annualisation "explain" a figure ×1.25 about one
 * time in twenty on the bench universe.
 */
function isReproduced(tried: Tried, figure: FigureToExplain): boolean {
  return distanceOf(tried, figure) <= Math.max(figure.halfUnit, (figure.allowed(tried.computed) * tried.factor) / 10) + slack(figure);
}

/**
 * A pair has more freedom to land near any number by chance (a few hundred pairs against a
 * score of single changes), so it must also stay within the tolerance when the vendor printed
 * coarser than that. Accepted within the whole tolerance, 2 of the 44 gross errors of
 * test/reconcile/planted.test.ts (figures ×1.25) found such a chance pair.
 */
function isReproducedStrictly(tried: Tried, figure: FigureToExplain): boolean {
  return isReproduced(tried, figure) && distanceOf(tried, figure) <= figure.allowed(tried.computed) * tried.factor + slack(figure);
}

function distanceOf(tried: Tried, figure: FigureToExplain): number {
  return Math.abs(tried.asRead - figure.vendor);
}

/** Floating-point slack, so that a figure exactly half a unit away still rounds to the print. */
function slack(figure: FigureToExplain): number {
  return 1e-10 * Math.max(1, Math.abs(figure.vendor));
}

/**
 * Fewer changes first; then those that land within the vendor's printed half unit (the printed
 * figure cannot tell them apart) before those that need the tolerance; then the candidates'
 * declared order (common conventions first); then the closest.
 */
function rank(found: readonly Tried[], figure: FigureToExplain): Tried[] {
  return found
    .map((tried, order) => {
      const distance = Math.abs(tried.asRead - figure.vendor);
      return { tried, order, distance: distance / tried.factor, printed: distance <= figure.halfUnit + 1e-10 ? 0 : 1 };
    })
    .sort((a, b) => a.tried.changes.length - b.tried.changes.length || a.printed - b.printed || a.order - b.order || a.distance - b.distance)
    .map(({ tried }) => tried);
}

function toExplanation(tried: Tried): ConventionExplanation {
  const changes: Record<string, unknown> = {};
  for (const { dimension, value } of tried.changes) changes[dimension] = value;
  return { kind: 'convention', changes, computed: tried.asRead };
}
