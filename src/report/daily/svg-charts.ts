import { escapeHtml } from '../safe-text.js';
import type { RunCounts } from '../../tickets/ledger.js';
import type { NavChart } from './chart-data.js';

/**
 * Hand-drawn SVG charts: a few hundred bytes of markup each, no script, no font, drawn by the
 * browser even offline and in print (docs/decisions.md says why no charting library).
 */
const WIDTH = 640;
const HEIGHT = 220;
const PAD = { left: 56, right: 12, top: 12, bottom: 28 };
const COLOURS = { nav: '#1f4e79', benchmark: '#7f7f7f', mark: '#b03a2e', band: '#f2d7d5', new: '#d35400', open: '#2e86c1', resolved: '#239b56', tolerance: '#d5f5e3' };

const n = (value: number) => (Math.round(value * 10) / 10).toString();

function frame(title: string, body: string, height = HEIGHT): string {
  return `<svg class="chart" viewBox="0 0 ${WIDTH} ${height}" role="img" aria-label="${escapeHtml(title)}" xmlns="http://www.w3.org/2000/svg"><title>${escapeHtml(title)}</title>${body}</svg>`;
}

function scale(domain: readonly [number, number], range: readonly [number, number]): (v: number) => number {
  const [d0, d1] = domain;
  const span = d1 - d0 || 1;
  return (v) => range[0] + ((v - d0) / span) * (range[1] - range[0]);
}

function dayNumber(iso: string): number {
  return Date.UTC(Number(iso.slice(0, 4)), Number(iso.slice(5, 7)) - 1, Number(iso.slice(8, 10))) / 86_400_000;
}

function yAxis(y: (v: number) => number, low: number, high: number): string {
  const ticks = [low, low + (high - low) / 3, low + (2 * (high - low)) / 3, high];
  return ticks
    .map((t) => `<line x1="${PAD.left}" x2="${WIDTH - PAD.right}" y1="${n(y(t))}" y2="${n(y(t))}" stroke="#e5e5e5"/><text x="${PAD.left - 4}" y="${n(y(t) + 4)}" text-anchor="end" font-size="12">${Number(t.toPrecision(4))}</text>`)
    .join('');
}

/** The NAV as a line, its benchmark rebased and dashed, flagged days as red dots and flagged runs as shaded bands. */
export function navChartSvg(chart: NavChart): string {
  const values = [...chart.points.map(([, v]) => v), ...chart.benchmark.map(([, v]) => v)];
  const low = Math.min(...values);
  const high = Math.max(...values);
  const first = dayNumber(chart.points[0][0]);
  const last = dayNumber(chart.points[chart.points.length - 1][0]);
  const x = scale([first, last], [PAD.left, WIDTH - PAD.right]);
  const y = scale([low, high], [HEIGHT - PAD.bottom, PAD.top]);
  const line = (points: ReadonlyArray<readonly [string, number]>) => points.map(([d, v]) => `${n(x(dayNumber(d)))},${n(y(v))}`).join(' ');
  const valueOn = new Map(chart.points.map(([d, v]) => [d, v]));
  let bands = '';
  let dots = '';
  for (const m of chart.marks) {
    const label = `<title>${escapeHtml(`${m.check} (${m.severity}) ${m.start}${m.end !== m.start ? ` to ${m.end}` : ''}`)}</title>`;
    const x0 = x(Math.max(first, dayNumber(m.start)));
    const x1 = x(Math.min(last, dayNumber(m.end)));
    if (x1 - x0 >= 2) {
      bands += `<rect class="mark" x="${n(x0)}" y="${PAD.top}" width="${n(x1 - x0)}" height="${HEIGHT - PAD.top - PAD.bottom}" fill="${COLOURS.band}" opacity="0.7">${label}</rect>`;
    } else {
      const v = valueOn.get(m.start) ?? valueOn.get(m.end);
      dots += `<circle class="mark" cx="${n(x0)}" cy="${n(v === undefined ? PAD.top + 6 : y(v))}" r="4.5" fill="none" stroke="${COLOURS.mark}" stroke-width="2">${label}</circle>`;
    }
  }
  const xLabels = [chart.points[0][0], chart.points[chart.points.length - 1][0]]
    .map((d, i) => `<text x="${n(i === 0 ? PAD.left : WIDTH - PAD.right)}" y="${HEIGHT - 8}" text-anchor="${i === 0 ? 'start' : 'end'}" font-size="12">${d}</text>`)
    .join('');
  const benchmark = chart.benchmark.length > 1 ? `<polyline class="benchmark" fill="none" stroke="${COLOURS.benchmark}" stroke-dasharray="4 3" stroke-width="1.2" points="${line(chart.benchmark)}"/>` : '';
  const title = `NAV of ${chart.series_id}${chart.benchmark_id && chart.benchmark.length > 1 ? ` with ${chart.benchmark_id} rebased (dashed)` : ''}; flagged dates in red`;
  return frame(title, `${bands}${yAxis(y, low, high)}${benchmark}<polyline class="nav" fill="none" stroke="${COLOURS.nav}" stroke-width="1.5" points="${line(chart.points)}"/>${dots}${xLabels}`);
}

/** Tickets per run: new, still open (including reopened) and resolved, side by side. */
export function runCountsSvg(runs: readonly RunCounts[]): string {
  const shown = runs.slice(-30);
  const high = Math.max(1, ...shown.map((r) => Math.max(r.new, r.open + r.reopened, r.resolved)));
  const y = scale([0, high], [HEIGHT - PAD.bottom, PAD.top]);
  const slot = (WIDTH - PAD.left - PAD.right) / Math.max(1, shown.length);
  const bar = Math.max(2, Math.min(14, (slot - 4) / 3));
  const bars = shown
    .map((run, i) => {
      const x0 = PAD.left + i * slot + (slot - 3 * bar) / 2;
      const one = (value: number, k: number, colour: string, label: string) =>
        `<rect class="bar" x="${n(x0 + k * bar)}" y="${n(y(value))}" width="${n(bar)}" height="${n(y(0) - y(value))}" fill="${colour}"><title>${run.as_of}: ${value} ${label}</title></rect>`;
      const date = shown.length <= 8 || i === 0 || i === shown.length - 1 ? `<text x="${n(x0 + 1.5 * bar)}" y="${HEIGHT - 8}" text-anchor="middle" font-size="12">${run.as_of}</text>` : '';
      return one(run.new, 0, COLOURS.new, 'new') + one(run.open + run.reopened, 1, COLOURS.open, 'open') + one(run.resolved, 2, COLOURS.resolved, 'resolved') + date;
    })
    .join('');
  const legend = [['new', COLOURS.new], ['open', COLOURS.open], ['resolved', COLOURS.resolved]]
    .map(([label, colour], k) => `<rect x="${PAD.left + k * 80}" y="2" width="10" height="10" fill="${colour}"/><text x="${PAD.left + 14 + k * 80}" y="11" font-size="12">${label}</text>`)
    .join('');
  return frame('Tickets over the recent runs: new, open and resolved', `${yAxis(y, 0, high)}${bars}${legend}`);
}

export interface ToleranceRow {
  readonly label: string;
  readonly vendor: number;
  readonly computed: number;
  readonly tolerance: number;
  readonly status: string;
}

/**
 * Vendor against computed, one row a figure: the vendor's difference from the computed figure in
 * units of its tolerance, inside the green band when within tolerance; clipped at ±5 tolerances.
 */
export function toleranceSvg(rows: readonly ToleranceRow[]): string {
  const rowHeight = 18;
  const height = PAD.top + PAD.bottom + rows.length * rowHeight;
  const left = 200;
  const x = scale([-5, 5], [left, WIDTH - PAD.right]);
  const band = `<rect x="${n(x(-1))}" y="${PAD.top}" width="${n(x(1) - x(-1))}" height="${rows.length * rowHeight}" fill="${COLOURS.tolerance}"/><line x1="${n(x(0))}" x2="${n(x(0))}" y1="${PAD.top}" y2="${PAD.top + rows.length * rowHeight}" stroke="#999"/>`;
  const dots = rows
    .map((row, i) => {
      const units = row.tolerance > 0 ? (row.vendor - row.computed) / row.tolerance : 0;
      const cx = x(Math.max(-5, Math.min(5, units)));
      const cy = PAD.top + i * rowHeight + rowHeight / 2;
      const colour = row.status === 'breach' ? COLOURS.mark : row.status === 'rounding' ? '#b7950b' : COLOURS.resolved;
      return `<text x="${left - 6}" y="${n(cy + 4)}" text-anchor="end" font-size="12">${escapeHtml(row.label)}</text><circle class="figure" cx="${n(cx)}" cy="${n(cy)}" r="4.5" fill="${colour}"><title>${escapeHtml(`${row.label}: vendor ${row.vendor}, computed ${row.computed}, tolerance ${row.tolerance} (${row.status})`)}</title></circle>`;
    })
    .join('');
  const axis = [-5, -1, 0, 1, 5].map((t) => `<text x="${n(x(t))}" y="${height - 8}" text-anchor="middle" font-size="12">${t}</text>`).join('');
  return frame('Vendor minus computed, in tolerances (green band: within tolerance)', band + dots + axis, height);
}
