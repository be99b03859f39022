import type { SeriesSlice } from '../series/frame.js';

/** Groups of two or more rows sharing a date (the frame keeps them adjacent, in file order). */
export function sameDateGroups(series: SeriesSlice): number[][] {
  const groups: number[][] = [];
  let i = 0;
  while (i < series.dates.length) {
    let j = i + 1;
    while (j < series.dates.length && series.dates[j] === series.dates[i]) j++;
    if (j - i > 1) groups.push(Array.from({ length: j - i }, (_, k) => i + k));
    i = j;
  }
  return groups;
}

export function allValuesEqual(series: SeriesSlice, rows: number[]): boolean {
  return rows.every((row) => Object.is(series.values[row], series.values[rows[0]]) || series.values[row] === series.values[rows[0]]);
}

export function rowEvidence(series: SeriesSlice, rows: number[]) {
  return rows.map((row) => ({ value: series.values[row], line: series.lines[row] }));
}
