import { BusinessCalendars } from '../calendar/business-calendar.js';
import { epochDay, formatIsoDate, civilFromEpochDay } from '../calendar/days.js';
import { SeededRandom } from '../random.js';
import { vendorFile } from './vendor-figures.js';

/**
 * The built-in demo: an invented fund house, Bramblecourt Funds, with thirteen share classes,
 * three invented benchmarks, a risk-free rate and two holiday calendars, over six years of
 * business days. Some series carry the faults a data team meets (a stale NAV, a unit change,
 * a keying error, a wrong benchmark …) and some carry legitimate events that must not be flagged
 * (an announced split, an announced distribution, a money-market fund that accrues).
 */
export const DEMO_AS_OF = epochDay(2026, 11, 30);
export const DEMO_PREVIOUS_AS_OF = epochDay(2026, 11, 27);
const FIRST_DAY = epochDay(2020, 10, 1);

interface FundPlan {
  readonly id: string;
  readonly name: string;
  readonly category: string;
  /** The benchmark the master maps it to. */
  readonly benchmark: string;
  /** The benchmark that really drives it (differs only for the mis-mapped fund). */
  readonly driver: 'BCK-EQ' | 'BCK-MID' | 'BCK-BOND' | 'cash';
  readonly beta: number;
  readonly dailyAlpha: number;
  readonly noise: number;
  readonly calendar: 'ARDEN' | 'VESTRA';
  readonly stableValue?: boolean;
  readonly startNav: number;
}

const FUNDS: readonly FundPlan[] = [
  { id: 'NVA0001', name: 'Bramblecourt Core Equity A', category: 'equity', benchmark: 'BCK-EQ', driver: 'BCK-EQ', beta: 0.95, dailyAlpha: 0.00004, noise: 0.0035, calendar: 'ARDEN', startNav: 124.5 },
  { id: 'NVA0002', name: 'Bramblecourt Core Equity I', category: 'equity', benchmark: 'BCK-EQ', driver: 'BCK-EQ', beta: 0.95, dailyAlpha: 0.00007, noise: 0.0035, calendar: 'ARDEN', startNav: 131.2 },
  { id: 'NVA0003', name: 'Bramblecourt Broad Equity Index Tracker', category: 'equity index', benchmark: 'BCK-EQ', driver: 'BCK-EQ', beta: 1.0, dailyAlpha: -0.000008, noise: 0.0003, calendar: 'ARDEN', startNav: 57.8 },
  { id: 'NVA0004', name: 'Bramblecourt Mid Cap Opportunities', category: 'equity', benchmark: 'BCK-BOND', driver: 'BCK-MID', beta: 1.05, dailyAlpha: 0.00003, noise: 0.003, calendar: 'ARDEN', startNav: 88.1 },
  { id: 'NVA0005', name: 'Bramblecourt Government Bond', category: 'bond', benchmark: 'BCK-BOND', driver: 'BCK-BOND', beta: 0.9, dailyAlpha: 0.00001, noise: 0.0008, calendar: 'ARDEN', startNav: 102.3 },
  { id: 'NVA0006', name: 'Bramblecourt Liquidity Reserve', category: 'money market', benchmark: 'BCK-BOND', driver: 'cash', beta: 1, dailyAlpha: 0, noise: 0, calendar: 'ARDEN', stableValue: true, startNav: 1.0 },
  { id: 'NVA0007', name: 'Bramblecourt Dividend Leaders', category: 'equity', benchmark: 'BCK-EQ', driver: 'BCK-EQ', beta: 0.85, dailyAlpha: 0.00002, noise: 0.004, calendar: 'ARDEN', startNav: 74.9 },
  { id: 'NVA0008', name: 'Bramblecourt Global Growth', category: 'equity', benchmark: 'BCK-EQ', driver: 'BCK-EQ', beta: 1.1, dailyAlpha: 0.00005, noise: 0.005, calendar: 'ARDEN', startNav: 1460.0 },
  { id: 'NVA0009', name: 'Bramblecourt Smaller Companies', category: 'equity', benchmark: 'BCK-MID', driver: 'BCK-MID', beta: 1.15, dailyAlpha: 0.00002, noise: 0.005, calendar: 'ARDEN', startNav: 23.6 },
  { id: 'NVA0010', name: 'Bramblecourt Balanced', category: 'mixed', benchmark: 'BCK-EQ', driver: 'BCK-EQ', beta: 0.55, dailyAlpha: 0.00001, noise: 0.002, calendar: 'ARDEN', startNav: 49.3 },
  { id: 'NVA0011', name: 'Bramblecourt Real Assets', category: 'equity', benchmark: 'BCK-MID', driver: 'BCK-MID', beta: 0.8, dailyAlpha: 0.00001, noise: 0.004, calendar: 'ARDEN', startNav: 66.0 },
  { id: 'NVA0012', name: 'Bramblecourt Europe Select', category: 'equity', benchmark: 'BCK-EQ', driver: 'BCK-EQ', beta: 0.9, dailyAlpha: 0.00003, noise: 0.003, calendar: 'VESTRA', startNav: 35.4 },
  { id: 'NVA0013', name: 'Bramblecourt Income Distributor', category: 'equity', benchmark: 'BCK-EQ', driver: 'BCK-EQ', beta: 0.8, dailyAlpha: 0.00002, noise: 0.003, calendar: 'ARDEN', startNav: 41.7 },
];

/** Events planted in the demo, each with what a careful reader should conclude. */
export const DEMO_EVENTS = {
  staleFrom: epochDay(2026, 11, 16), // NVA0007 repeats its NAV through 2026-11-23
  staleTo: epochDay(2026, 11, 23),
  split: epochDay(2026, 6, 15), // NVA0008: ten new units per old unit, announced
  centsFrom: epochDay(2026, 9, 1), // NVA0009 switches to quoting in cents, not announced
  keyingError: epochDay(2026, 10, 14), // NVA0010 is keyed 8 % too high for one day
  gapFrom: epochDay(2026, 8, 10), // NVA0011 misses three business days
  gapTo: epochDay(2026, 8, 12),
  lateAfter: epochDay(2026, 11, 25), // NVA0011's last NAV
  distribution: epochDay(2026, 3, 16), // NVA0013 pays 0.85 a unit out of the NAV, announced
  restated: epochDay(2026, 10, 20), // NVA0005's value changed since yesterday's snapshot
  dropped: epochDay(2026, 9, 9), // NVA0001's row present yesterday, absent today
  zeroNav: epochDay(2026, 7, 7), // NVA0005 is sent a NAV of zero
  stampedLateFrom: epochDay(2026, 6, 1), // NVA0012's NAVs carry the next business day's date from here on
} as const;

export interface DemoFiles {
  readonly [name: string]: string;
}

/** Holidays of the two invented calendars, fixed dates every year; VESTRA adds 15 August to ARDEN's. */
function holidayRows(): Array<[string, number]> {
  const rows: Array<[string, number]> = [];
  for (let year = 2020; year <= 2027; year++) {
    for (const [month, day] of [[1, 1], [5, 1], [12, 25], [12, 26]]) rows.push(['ARDEN', epochDay(year, month, day)]);
    for (const [month, day] of [[1, 1], [5, 1], [8, 15], [12, 25], [12, 26]]) rows.push(['VESTRA', epochDay(year, month, day)]);
  }
  return rows;
}

function calendarsOf(holidays: Array<[string, number]>): BusinessCalendars {
  const calendars = new BusinessCalendars();
  for (const [name, day] of holidays) calendars.addHoliday(name, day);
  return calendars;
}

interface MarketPaths {
  readonly days: number[];
  readonly returns: Record<'BCK-EQ' | 'BCK-MID' | 'BCK-BOND', Float64Array>;
  readonly annualRate: Float64Array;
}

/** Benchmark returns and the risk-free rate on every ARDEN business day up to the as-of. */
function marketPaths(random: SeededRandom, calendars: BusinessCalendars): MarketPaths {
  const days: number[] = [];
  for (let day = FIRST_DAY; day <= DEMO_AS_OF; day++) if (calendars.isBusinessDay('ARDEN', day)) days.push(day);
  const equity = new Float64Array(days.length);
  const midCaps = new Float64Array(days.length);
  const bonds = new Float64Array(days.length);
  const annualRate = new Float64Array(days.length);
  for (let i = 0; i < days.length; i++) {
    const market = 0.0105 * random.normal();
    equity[i] = 0.00035 + market;
    midCaps[i] = 0.0003 + 0.8 * market + 0.007 * random.normal();
    bonds[i] = 0.00012 - 0.05 * market + 0.0025 * random.normal();
    annualRate[i] = 0.018 + 0.014 * Math.min(1, i / (days.length * 0.6)) + 0.0005 * Math.sin(i / 40);
  }
  return { days, returns: { 'BCK-EQ': equity, 'BCK-MID': midCaps, 'BCK-BOND': bonds }, annualRate };
}

interface NavRow {
  readonly id: string;
  readonly day: number;
  readonly nav: number;
}

function fundPath(plan: FundPlan, market: MarketPaths, random: SeededRandom, calendars: BusinessCalendars): NavRow[] {
  const rows: NavRow[] = [];
  let nav = plan.startNav;
  for (let i = 0; i < market.days.length; i++) {
    const day = market.days[i];
    const driverReturn = plan.driver === 'cash' ? market.annualRate[i] / 252 : market.returns[plan.driver][i];
    nav *= 1 + plan.dailyAlpha + plan.beta * driverReturn + plan.noise * random.normal();
    if (!calendars.isBusinessDay(plan.calendar, day)) continue;
    rows.push({ id: plan.id, day, nav });
  }
  return rows;
}

/** The faults and events of DEMO_EVENTS, applied to the clean paths. */
function plantEvents(paths: Map<string, NavRow[]>, calendars: BusinessCalendars): void {
  const edit = (id: string, change: (row: NavRow, index: number, rows: NavRow[]) => NavRow | null) => {
    const rows = paths.get(id)!;
    paths.set(id, rows.map((row, i) => change(row, i, rows)).filter((row): row is NavRow => row !== null));
  };
  const e = DEMO_EVENTS;
  edit('NVA0007', (row, i, rows) => {
    if (row.day <= e.staleFrom || row.day > e.staleTo) return row;
    return { ...row, nav: rows.find((r) => r.day === e.staleFrom)!.nav };
  });
  edit('NVA0008', (row) => (row.day >= e.split ? { ...row, nav: row.nav / 10 } : row));
  edit('NVA0009', (row) => (row.day >= e.centsFrom ? { ...row, nav: row.nav * 100 } : row));
  edit('NVA0010', (row) => (row.day === e.keyingError ? { ...row, nav: row.nav * 1.08 } : row));
  edit('NVA0011', (row) => ((row.day >= e.gapFrom && row.day <= e.gapTo) || row.day > e.lateAfter ? null : row));
  edit('NVA0012', (row) => (row.day >= e.stampedLateFrom ? { ...row, day: nextBusinessDay(calendars, 'VESTRA', row.day) } : row));
  edit('NVA0013', (row) => (row.day >= e.distribution ? { ...row, nav: row.nav - 0.85 } : row));
  edit('NVA0001', (row) => (row.day === e.dropped ? null : row));
  edit('NVA0005', (row) => (row.day === e.zeroNav ? { ...row, nav: 0 } : row));
}

function nextBusinessDay(calendars: BusinessCalendars, calendar: string, day: number): number {
  let next = day + 1;
  while (!calendars.isBusinessDay(calendar, next)) next++;
  return next;
}

const navLine = (id: string, day: number, nav: number) => `${id},${formatIsoDate(day)},${nav.toFixed(4)}`;

/** Rows a careless upstream adds to a feed: duplicates, a conflict, bad values, misdated rows. */
function faultyRows(paths: Map<string, NavRow[]>): string[] {
  const at = (id: string, day: number) => paths.get(id)!.find((row) => row.day === day)!.nav;
  const day = (y: number, m: number, d: number) => epochDay(y, m, d);
  return [
    navLine('NVA0001', day(2026, 11, 27), at('NVA0001', day(2026, 11, 27))), // the same row twice
    navLine('NVA0002', day(2026, 11, 26), at('NVA0002', day(2026, 11, 26)) * 1.013), // a correction sent as a new row
    'NVA0003,2026-11-3O,57.1234', // a letter O typed for a zero
    'NVA0001,2026-11-30', // a field missing
    'NVA0004,2026-11-30,"88.12', // an unbalanced quote
    navLine('NVA0001', day(2026, 12, 31), 130.5), // a date after the as-of
    navLine('NVA0010', day(2026, 11, 28), at('NVA0010', day(2026, 11, 27))), // Friday's NAV stamped on Saturday
    navLine('NVA0099', day(2026, 11, 27), 10.0), // a share class the master does not know
    navLine('NVA0099', day(2026, 11, 30), 10.02),
  ];
}

function navFile(paths: Map<string, NavRow[]>, through: number, extra: string[]): string {
  const lines = ['series_id,date,nav'];
  for (const rows of paths.values()) for (const row of rows) if (row.day <= through) lines.push(navLine(row.id, row.day, row.nav));
  return [...lines, ...extra].join('\n') + '\n';
}

/** Benchmark levels in a vendor's own layout: semicolons, day-first dates, decimal commas. */
function benchmarkFile(market: MarketPaths): string {
  const lines = ['Index Code;Value Date;Close'];
  for (const [id, returns] of Object.entries(market.returns)) {
    let level = id === 'BCK-BOND' ? 480 : 1000;
    market.days.forEach((day, i) => {
      level *= 1 + returns[i];
      const { year, month, day: dom } = civilFromEpochDay(day);
      const date = `${String(dom).padStart(2, '0')}/${String(month).padStart(2, '0')}/${year}`;
      lines.push(`${id};${date};${level.toFixed(4).replace('.', ',')}`);
    });
  }
  return lines.join('\n') + '\n';
}

function ratesFile(market: MarketPaths): string {
  const lines = ['rate_id,date,rate'];
  market.days.forEach((day, i) => lines.push(`RF-ARD,${formatIsoDate(day)},${market.annualRate[i].toFixed(5)}`));
  return lines.join('\n') + '\n';
}

function masterFile(): string {
  const lines = ['series_id,benchmark_id,name,category,currency,calendar,rate_id,stable_value,inception'];
  for (const f of FUNDS) {
    lines.push([f.id, f.benchmark, `"${f.name}"`, f.category, 'EUR', f.calendar, 'RF-ARD', f.stableValue ? 'true' : 'false', formatIsoDate(FIRST_DAY)].join(','));
  }
  return lines.join('\n') + '\n';
}

function actionsFile(): string {
  return [
    'series_id,ex_date,kind,value',
    `NVA0008,${formatIsoDate(DEMO_EVENTS.split)},split,10`,
    `NVA0013,${formatIsoDate(DEMO_EVENTS.distribution)},distribution,0.85`,
    '',
  ].join('\n');
}

function holidaysFile(holidays: Array<[string, number]>): string {
  return ['calendar,date', ...holidays.map(([name, day]) => `${name},${formatIsoDate(day)}`), ''].join('\n');
}

/** The business days the demo runs in order; the last is DEMO_AS_OF. */
export const DEMO_DAYS = [epochDay(2026, 11, 26), DEMO_PREVIOUS_AS_OF, DEMO_AS_OF] as const;

/**
 * Today's and yesterday's feed files of the demo, by file name, and the NAV file of each earlier
 * demo day under days/<date>/. Across the days some faults stay (open tickets), some appear
 * (new), one is fixed (resolved: NVA0003's conflicting rows of 2026-11-25 are withdrawn on the
 * last day) and one is acknowledged in acknowledgements.yaml (NVA0004's benchmark mapping).
 */
export function demoFiles(seed = 20261130): DemoFiles {
  const random = new SeededRandom(seed);
  const holidays = holidayRows();
  const calendars = calendarsOf(holidays);
  const market = marketPaths(random, calendars);
  const paths = new Map(FUNDS.map((plan) => [plan.id, fundPath(plan, market, random, calendars)]));
  const yesterdayPaths = new Map([...paths].map(([id, rows]) => [id, rows.slice()]));
  plantEvents(paths, calendars);
  plantEvents(yesterdayPaths, calendars);
  restoreForYesterday(yesterdayPaths, paths);
  const feed = {
    nav: navFile(paths, DEMO_AS_OF, faultyRows(paths)),
    benchmarks: benchmarkFile(market),
    rates: ratesFile(market),
    master: masterFile(),
    actions: actionsFile(),
  };
  const [firstDay, secondDay] = DEMO_DAYS;
  return {
    'nav.csv': feed.nav,
    'nav-previous.csv': navFile(yesterdayPaths, DEMO_PREVIOUS_AS_OF, []),
    [`days/${formatIsoDate(firstDay)}/nav.csv`]: navFile(yesterdayPaths, firstDay, earlierDayRows(yesterdayPaths, firstDay)),
    [`days/${formatIsoDate(secondDay)}/nav.csv`]: navFile(yesterdayPaths, secondDay, earlierDayRows(yesterdayPaths, secondDay)),
    'benchmarks.csv': feed.benchmarks,
    'rates.csv': feed.rates,
    'master.csv': feed.master,
    'actions.csv': feed.actions,
    'holidays.csv': holidaysFile(holidays),
    'vendor-figures.csv': vendorFile(feed, DEMO_AS_OF),
    'acknowledgements.yaml': acknowledgementsFile(),
  };
}

/** The faulty rows of an earlier demo day: a future-dated row and an unknown series all along, NVA0003's conflict until it is fixed. */
function earlierDayRows(paths: Map<string, NavRow[]>, through: number): string[] {
  const conflictDay = epochDay(2026, 11, 25);
  const nav = paths.get('NVA0003')!.find((row) => row.day === conflictDay)!.nav;
  const rows = [navLine('NVA0001', epochDay(2026, 12, 31), 130.5), navLine('NVA0099', epochDay(2026, 11, 26), 10.0), navLine('NVA0003', conflictDay, nav * 0.97)];
  if (through >= DEMO_PREVIOUS_AS_OF) rows.push(navLine('NVA0099', DEMO_PREVIOUS_AS_OF, 10.0));
  return rows;
}

function acknowledgementsFile(): string {
  return `# Tickets the team knows about. Each entry silences its ticket through its expiry date.
# An expired entry, or a ticket whose findings change, shows the ticket again (docs/tickets.md).
- key: "benchmark_mismatch|NVA0004"
  reason: the master maps the fund to the bond benchmark; the product team is correcting the mapping
  who: data-ops (invented)
  expires: 2026-12-31
`;
}

/** Yesterday still had NVA0001's dropped row, and NVA0005's restated day held another value. */
function restoreForYesterday(yesterday: Map<string, NavRow[]>, today: Map<string, NavRow[]>): void {
  const first = yesterday.get('NVA0001')!;
  const before = first.findIndex((row) => row.day > DEMO_EVENTS.dropped);
  const neighbour = first[before - 1];
  first.splice(before, 0, { id: 'NVA0001', day: DEMO_EVENTS.dropped, nav: neighbour.nav * 1.001 });
  const bond = yesterday.get('NVA0005')!;
  const index = bond.findIndex((row) => row.day === DEMO_EVENTS.restated);
  bond[index] = { ...bond[index], nav: today.get('NVA0005')![index].nav * 0.996 };
}

/**
 * The run configuration of one demo day. The last day's is navassay.yaml beside the files; an
 * earlier day's sits in days/<date>/ with its NAV file and reports into report/<date>/.
 */
export function demoConfig(day: number = DEMO_AS_OF): string {
  const last = day === DEMO_AS_OF;
  const up = last ? '' : '../../';
  return `# navassay run configuration for the invented Bramblecourt Funds demo${last ? '' : `, business day ${formatIsoDate(day)}`}.
feed: bramblecourt-daily
as_of: ${formatIsoDate(day)}
store: ${up}store
files:
  nav: nav.csv
  benchmarks: { path: ${up}benchmarks.csv, profile: index-vendor }
  master: ${up}master.csv
  rates: ${up}rates.csv
  holidays: ${up}holidays.csv
  actions: ${up}actions.csv
  vendor: ${up}vendor-figures.csv
acknowledgements: ${up}acknowledgements.yaml
profiles:
  # The index vendor writes "Index Code;Value Date;Close" with day-first dates and decimal commas.
  index-vendor:
    columns: { benchmark_id: Index Code, date: Value Date, level: Close }
    delimiter: ";"
    decimal: ","
    date_format: day-first
windows: [1y, 3y, 5y]
output:
  dir: ${last ? 'report' : `${up}report/${formatIsoDate(day)}`}
  formats: [json, html, markdown, csv]
fail_on: none
`;
}
