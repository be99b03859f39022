/**
 * Speed never changes answers: prints one SHA-256 per input of the checks' findings (keys,
 * order, messages, evidence), so a speed change can be compared before and after by eye or by
 * `diff`. Inputs: the demo (with its previous snapshot), seeds of both fault-planting generators
 * (plain and with the subtle kinds), and optionally a cached bench universe.
 *
 *   node dist/bench/checks-fingerprint.js                     # demo and generators
 *   node dist/bench/checks-fingerprint.js --universe DIR      # also a cached standard universe (its nav.csv, …)
 *   node dist/bench/checks-fingerprint.js --threads 2         # the worker-thread runner instead of the plain one
 *   node dist/bench/checks-fingerprint.js --only demo --dump DIR   # one input, its findings written to DIR
 *
 * It also prints the checks' CPU seconds per input, on stderr, for a rough before/after.
 */
import { createHash } from 'node:crypto';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { generateUniverse } from '../fixtures/universe/generate.js';
import { generateAltUniverse } from '../fixtures/universe-alt/generate.js';
import { parseIsoDate } from '../src/calendar/days.js';
import { runChecks, type CheckInput } from '../src/checks/run.js';
import { runChecksInParallel } from '../src/checks/parallel.js';
import type { Finding } from '../src/findings.js';
import { DEMO_AS_OF, demoFiles } from '../src/demo/scenario.js';
import { loadFeed } from '../src/ingest/feed.js';
import { FeedProfileSchema } from '../src/ingest/profile.js';

const args = process.argv.slice(2);
const option = (name: string): string | undefined => {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : undefined;
};
const threads = Number(option('--threads') ?? 0);
const universeDir = option('--universe');
const only = option('--only');
const dump = option('--dump');

async function findingsOf(input: CheckInput): Promise<{ findings: Finding[]; cpu: number }> {
  const cpu0 = process.cpuUsage();
  const findings = threads > 0 ? await runChecksInParallel(input, {}, { threads, minRows: 0 }) : runChecks(input);
  const used = process.cpuUsage(cpu0);
  return { findings, cpu: (used.user + used.system) / 1e6 };
}

async function report(name: string, input: () => CheckInput | Promise<CheckInput>): Promise<void> {
  if (only !== undefined && !name.startsWith(only)) return;
  const { findings, cpu } = await findingsOf(await input());
  const hash = createHash('sha256').update(JSON.stringify(findings)).digest('hex').slice(0, 16);
  if (dump !== undefined) writeFileSync(join(dump, `${name.replace(/ /g, '-')}.json`), JSON.stringify(findings, null, 1));
  console.log(`${name.padEnd(24)} ${String(findings.length).padStart(6)} findings  ${hash}`);
  console.error(`${name.padEnd(24)} checks CPU ${cpu.toFixed(2)} s`);
}

async function demoInput(): Promise<CheckInput> {
  // The findings of unreadable rows name the file, and the hash must not move with the folder:
  // the files are read by relative names from inside a fresh folder, so two fingerprints can run
  // at once and still print the same hashes.
  const dir = mkdtempSync(join(tmpdir(), 'navassay-fingerprint-'));
  const startedIn = process.cwd();
  process.chdir(dir);
  try {
    for (const [file, text] of Object.entries(demoFiles())) {
      mkdirSync(dirname(join(dir, file)), { recursive: true });
      writeFileSync(join(dir, file), text);
    }
    const indexVendor = FeedProfileSchema.parse({ columns: { benchmark_id: 'Index Code', date: 'Value Date', level: 'Close' }, delimiter: ';', decimal: ',', date_format: 'day-first' });
    const at = (file: string) => file;
    const feed = await loadFeed(
      { nav: at('nav.csv'), benchmarks: at('benchmarks.csv'), master: at('master.csv'), rates: at('rates.csv'), holidays: at('holidays.csv'), actions: at('actions.csv'), vendor: at('vendor-figures.csv') },
      { profiles: { benchmarks: indexVendor } },
    );
    const previous = (await loadFeed({ nav: at('nav-previous.csv') })).nav;
    return { ...feed, previous, asOf: DEMO_AS_OF };
  } finally {
    process.chdir(startedIn);
    rmSync(dir, { recursive: true, force: true });
  }
}

await report('demo', demoInput);
for (const seed of [2001, 2002, 2003]) {
  await report(`universe ${seed}`, () => generateUniverse({ seed }));
  await report(`universe ${seed} subtle`, () => generateUniverse({ seed, subtle: true }));
}
for (const seed of [3001, 3002, 3003]) {
  await report(`universe-alt ${seed}`, () => generateAltUniverse({ seed }));
  await report(`universe-alt ${seed} subtle`, () => generateAltUniverse({ seed, subtle: true }));
}
if (universeDir !== undefined) {
  await report('bench universe', async () => {
    const at = (file: string) => join(universeDir, file);
    const feed = await loadFeed({ nav: at('nav.csv'), benchmarks: at('benchmarks.csv'), master: at('master.csv'), rates: at('rates.csv'), holidays: at('holidays.csv'), vendor: at('vendor.csv') });
    return { ...feed, asOf: parseIsoDate('2026-11-30')! };
  });
}
