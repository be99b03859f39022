/**
 * Pearson's correlation of the first `n` pairs, in two passes (means first, then centred sums):
 * the textbook one-pass form Σxy − ΣxΣy/n loses every digit when the values sit far from zero
 * relative to their spread (NAV levels, or returns with a large common mean). NaN when either
 * side has no spread or fewer than two pairs are given.
 */
export function correlation(x: ArrayLike<number>, y: ArrayLike<number>, n = x.length): number {
  if (n < 2) return NaN;
  let meanX = 0;
  let meanY = 0;
  for (let i = 0; i < n; i++) {
    meanX += x[i];
    meanY += y[i];
  }
  meanX /= n;
  meanY /= n;
  let cxx = 0;
  let cyy = 0;
  let cxy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i] - meanX;
    const dy = y[i] - meanY;
    cxx += dx * dx;
    cyy += dy * dy;
    cxy += dx * dy;
  }
  return cxx > 0 && cyy > 0 ? Math.max(-1, Math.min(1, cxy / Math.sqrt(cxx * cyy))) : NaN;
}
