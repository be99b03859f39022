/**
 * Two adjacent digits typed the wrong way round (123.54 for 123.45): a keying error whose
 * size depends on which digits were swapped, so on a fund that barely moves it may be far
 * below the 1 % a spike must otherwise reach. It is recognised by what it leaves: a move out
 * and a move back, each beyond the fund's bar for spikes, that both fall inside its usual
 * residual spread once the two digits are put back.
 */
import type { SeriesSlice } from '../series/frame.js';
import type { ResidualMoves } from './residual-moves.js';

export interface DigitSwap {
  /** The value as published, and the value with the two digits put back, as printed. */
  readonly typed: string;
  readonly intended: string;
  readonly intendedValue: number;
}

/** With the digits put back, both moves must be within this many robust standard deviations: ordinary days, fat tails included (1–3 % of days go beyond). */
const FITS_Z = 3;

/**
 * The adjacent-digit swap that explains step `k` and its reversal at step `k + 1`, if one does.
 * Both moves must reach `bar` robust standard deviations (the way back `backBar`), in opposite
 * directions: the series' own bar for spikes, so that only the size floor of a spike is waived
 * for a swap, never the evidence that the day is wrong. Below that bar a fat-tailed fund's
 * honest reversal is too often "repaired" by some swap by coincidence.
 */
export function swappedDigits(series: SeriesSlice, returns: ResidualMoves, k: number, bar: number, backBar: number): DigitSwap | null {
  if (k + 1 >= returns.count || returns.to[k] !== returns.from[k + 1]) return null;
  const zOut = returns.z[k];
  const zBack = returns.z[k + 1];
  if (!(Math.abs(zOut) >= bar && Math.abs(zBack) >= backBar) || Math.sign(zOut) !== -Math.sign(zBack)) return null;
  const before = series.values[returns.from[k]];
  const spike = series.values[returns.to[k]];
  const after = series.values[returns.to[k + 1]];
  const typed = spike.toFixed(Math.max(decimalsOf(before), decimalsOf(spike), decimalsOf(after)));
  let best: DigitSwap | null = null;
  let bestFit = FITS_Z;
  for (let i = 0; i + 1 < typed.length; i++) {
    const j = typed[i + 1] === '.' ? i + 2 : i + 1;
    if (j >= typed.length || !isDigit(typed[i]) || !isDigit(typed[j]) || typed[i] === typed[j]) continue;
    const intended = typed.slice(0, i) + typed[j] + typed.slice(i + 1, j) + typed[i] + typed.slice(j + 1);
    const value = Number(intended);
    if (!(value > 0)) continue;
    const out = zAfterChange(returns, k, Math.log(value / spike));
    const back = zAfterChange(returns, k + 1, Math.log(spike / value));
    const fit = Math.max(Math.abs(out), Math.abs(back));
    if (fit <= bestFit) [bestFit, best] = [fit, { typed, intended, intendedValue: value }];
  }
  return best;
}

/** Step k's robust z had its log move been larger by `change`. */
function zAfterChange(returns: ResidualMoves, k: number, change: number): number {
  const perUnit = returns.z[k] / returns.residual[k];
  return Number.isFinite(perUnit) ? (returns.residual[k] + change) * perUnit : NaN;
}

function decimalsOf(value: number): number {
  const text = String(value);
  const point = text.indexOf('.');
  return point < 0 || text.includes('e') ? 0 : text.length - point - 1;
}

function isDigit(c: string): boolean {
  return c >= '0' && c <= '9';
}
