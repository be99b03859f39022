/**
 * A value, or the reason there is none: a figure that cannot be computed, a window whose months
 * are missing, a benchmark or risk-free source that is not there. One shape for the whole
 * project, so a reason travels from where it arises to the answer without being re-wrapped.
 */
export type Outcome<T> = { readonly ok: true; readonly value: T } | { readonly ok: false; readonly reason: string };

export function success<T>(value: T): Outcome<T> {
  return { ok: true, value };
}

export function failure<T = never>(reason: string): Outcome<T> {
  return { ok: false, reason };
}
