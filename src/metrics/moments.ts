/**
 * Streaming moments: the sufficient statistics every metric is arithmetic on. Means and centred
 * sums are updated one observation at a time (Welford's method), so a variance never comes from
 * subtracting two large, nearly equal sums; that is what keeps tracking error accurate for a
 * fund that follows its benchmark closely.
 */

export type Denominator = 'sample' | 'population';

/** Means, centred sums of squares and the centred cross product of a pair (x, y). */
export class PairMoments {
  n = 0;
  meanX = 0;
  meanY = 0;
  /** Σ (x − mean x)². */
  sumSqX = 0;
  /** Σ (y − mean y)². */
  sumSqY = 0;
  /** Σ (x − mean x)(y − mean y). */
  sumXY = 0;

  add(x: number, y: number): void {
    this.n++;
    const dx = x - this.meanX;
    const dy = y - this.meanY;
    this.meanX += dx / this.n;
    this.meanY += dy / this.n;
    const dyAfter = y - this.meanY;
    this.sumSqX += dx * (x - this.meanX);
    this.sumSqY += dy * dyAfter;
    this.sumXY += dx * dyAfter;
  }
}

/** The divisor of a centred sum: n − 1 for the sample estimator, n for the population. */
export function divisor(n: number, denominator: Denominator): number {
  return denominator === 'sample' ? n - 1 : n;
}

export function varianceX(m: PairMoments, denominator: Denominator): number {
  return m.sumSqX / divisor(m.n, denominator);
}

export function varianceY(m: PairMoments, denominator: Denominator): number {
  return m.sumSqY / divisor(m.n, denominator);
}

export function covariance(m: PairMoments, denominator: Denominator): number {
  return m.sumXY / divisor(m.n, denominator);
}

/** Least-squares slope of y on x. The denominator cancels, so it is the same for both estimators. */
export function slopeYonX(m: PairMoments): number {
  return m.sumXY / m.sumSqX;
}

export function interceptYonX(m: PairMoments): number {
  return m.meanY - slopeYonX(m) * m.meanX;
}

export function correlation(m: PairMoments): number {
  return m.sumXY / Math.sqrt(m.sumSqX * m.sumSqY);
}

/** Σ of squared least-squares residuals of y on x: Syy − Sxy² / Sxx, never below zero. */
export function residualSumOfSquares(m: PairMoments): number {
  return Math.max(m.sumSqY - (m.sumXY * m.sumXY) / m.sumSqX, 0);
}

/** Mean and centred sum of squares of one variable. */
export class SeriesMoments {
  n = 0;
  mean = 0;
  /** Σ (x − mean x)². */
  sumSq = 0;

  add(x: number): void {
    this.n++;
    const dx = x - this.mean;
    this.mean += dx / this.n;
    this.sumSq += dx * (x - this.mean);
  }
}

export function variance(m: SeriesMoments, denominator: Denominator): number {
  return m.sumSq / divisor(m.n, denominator);
}

/** Moments of a vector pair in one pass. */
export function pairMoments(x: ArrayLike<number>, y: ArrayLike<number>): PairMoments {
  const moments = new PairMoments();
  for (let i = 0; i < x.length; i++) moments.add(x[i], y[i]);
  return moments;
}

/** Sums about a minimum acceptable return (MAR): the raw material of downside measures. */
export class TargetSums {
  /** Periods strictly below the target. */
  countBelow = 0;
  /** Σ (x − target)² over periods below the target. */
  sumSqBelow = 0;
  /** Σ (target − x) over periods below the target (a positive shortfall). */
  shortfallBelow = 0;
  /** Σ (x − target)² over periods above the target. */
  sumSqAbove = 0;

  add(x: number, target: number): void {
    const d = x - target;
    if (d < 0) {
      this.countBelow++;
      this.sumSqBelow += d * d;
      this.shortfallBelow -= d;
    } else {
      this.sumSqAbove += d * d;
    }
  }
}

/** True when a variance is zero up to rounding: a ratio divided by it would mean nothing. */
export function isNegligibleVariance(variance: number, mean: number): boolean {
  return !(variance > 1e-28 * Math.max(1, mean * mean));
}
