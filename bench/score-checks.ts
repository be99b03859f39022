/**
 * Scores every check on many fresh seeds of both invented universes, seeds no test uses, and
 * prints a per-check table (planted, found, recall, findings, real, precision) per generator
 * and pooled. Slow (a few seconds a seed), so it is a bench, not a test:
 *
 *   npx tsx bench/score-checks.ts                      # seeds 2001–2020 and 3001–3020
 *   npx tsx bench/score-checks.ts --seeds 20 --verbose # also list every miss and false alarm
 *   npx tsx bench/score-checks.ts --check return_outlier --verbose
 *   npx tsx bench/score-checks.ts --subtle             # with the subtle kinds planted too
 *
 * Options: `--seeds N` (seeds per generator, default 20), `--first A,B` (first seed of the
 * first and of the alternative generator, default 2001,3001), `--check ID` (only list misses
 * and false alarms of that check), `--verbose`, `--json`.
 */
import { generateUniverse } from '../fixtures/universe/generate.js';
import { generateAltUniverse } from '../fixtures/universe-alt/generate.js';
import { scoreFindings, type PooledScore as Pooled } from '../fixtures/universe/score.js';
import { runChecks } from '../src/checks/run.js';

const args = process.argv.slice(2);
const option = (name: string): string | undefined => {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : undefined;
};
const perGenerator = Number(option('--seeds') ?? 20);
const [firstMain, firstAlt] = (option('--first') ?? '2001,3001').split(',').map(Number);
const only = option('--check');
const verbose = args.includes('--verbose');
const asJson = args.includes('--json');
const subtle = args.includes('--subtle');

const generators = [
  { name: 'universe', seeds: Array.from({ length: perGenerator }, (_, i) => firstMain + i), make: (seed: number) => generateUniverse({ seed, subtle }) },
  { name: 'universe-alt', seeds: Array.from({ length: perGenerator }, (_, i) => firstAlt + i), make: (seed: number) => generateAltUniverse({ seed, subtle }) },
];

const tables: Record<string, Map<string, Pooled>> = {};
const all = new Map<string, Pooled>();
const add = (into: Map<string, Pooled>, check: string, s: Pooled) => {
  const t = into.get(check) ?? { planted: 0, found: 0, findings: 0, real: 0 };
  t.planted += s.planted;
  t.found += s.found;
  t.findings += s.findings;
  t.real += s.real;
  into.set(check, t);
};

let checkMs = 0;
for (const generator of generators) {
  const pooled = new Map<string, Pooled>();
  for (const seed of generator.seeds) {
    const universe = generator.make(seed);
    const t0 = performance.now();
    const findings = runChecks(universe);
    checkMs += performance.now() - t0;
    for (const score of scoreFindings(findings, universe).values()) {
      add(pooled, score.check, score);
      add(all, score.check, score);
      if (!verbose || (only !== undefined && score.check !== only)) continue;
      for (const fault of score.missed) console.log(`MISS  ${generator.name} ${seed} ${score.check} ${fault.series_id} ${fault.start}..${fault.end} ${fault.description}`);
      for (const f of score.spurious) console.log(`FALSE ${generator.name} ${seed} ${score.check} ${f.series_id} ${f.start}..${f.end} ${f.message}`);
    }
  }
  tables[generator.name] = pooled;
}
tables.pooled = all;

const row = (p: Pooled) => ({
  planted: p.planted,
  found: p.found,
  recall: p.planted === 0 ? 1 : +(p.found / p.planted).toFixed(3),
  findings: p.findings,
  real: p.real,
  precision: p.findings === 0 ? 1 : +(p.real / p.findings).toFixed(3),
});

if (asJson) {
  console.log(JSON.stringify(Object.fromEntries(Object.entries(tables).map(([name, t]) => [name, Object.fromEntries([...t].map(([c, p]) => [c, row(p)]))])), null, 2));
} else {
  for (const [name, table] of Object.entries(tables)) {
    const seeds = name === 'pooled' ? 'both' : generators.find((g) => g.name === name)!.seeds;
    console.log(`\n${name} (seeds ${Array.isArray(seeds) ? `${seeds[0]}–${seeds[seeds.length - 1]}` : seeds})`);
    console.table(Object.fromEntries([...table].sort(([a], [b]) => a.localeCompare(b)).map(([c, p]) => [c, row(p)])));
  }
  console.log(`checks ran in ${(checkMs / 1000).toFixed(1)} s over ${generators.length * perGenerator} universes`);
}
