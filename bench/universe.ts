import { formatIsoDate, isoWeekday, epochDay } from '../src/calendar/days.js';

/**
 * A large invented universe for speed measurements: share classes named NVA000001…, each with
 * a business-day NAV path. The values are a cheap deterministic random walk; the bench measures
 * reading speed, not realism.
 */
export interface BenchUniverse {
  readonly seriesCount: number;
  readonly days: readonly number[];
}

export function benchUniverse(seriesCount: number, businessDays: number, firstDay = epochDay(2021, 1, 4)): BenchUniverse {
  const days: number[] = [];
  for (let day = firstDay; days.length < businessDays; day++) if (isoWeekday(day) <= 5) days.push(day);
  return { seriesCount, days };
}

export function seriesId(index: number): string {
  return `NVA${String(index + 1).padStart(6, '0')}`;
}

/** The canonical NAV CSV of the universe, built in chunks to keep memory flat. */
export function navCsv(universe: BenchUniverse): Buffer {
  const isoDays = universe.days.map(formatIsoDate);
  const chunks: Buffer[] = [Buffer.from('series_id,date,nav\n')];
  let state = 12345;
  for (let s = 0; s < universe.seriesCount; s++) {
    const id = seriesId(s);
    let nav = 100 + (s % 50);
    const lines: string[] = [];
    for (const isoDay of isoDays) {
      state = (state * 1103515245 + 12345) >>> 0;
      nav *= 1 + ((state / 4294967296) - 0.5) * 0.02;
      lines.push(`${id},${isoDay},${nav.toFixed(4)}`);
    }
    chunks.push(Buffer.from(lines.join('\n') + '\n'));
  }
  return Buffer.concat(chunks);
}
