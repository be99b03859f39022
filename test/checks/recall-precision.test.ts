import { describe, expect, it } from 'vitest';
import { generateUniverse, type Universe } from '../../fixtures/universe/generate.js';
import { poolScores, scoreTable } from '../../fixtures/universe/score.js';
import { runChecks } from '../../src/checks/run.js';
import { CHECK_IDS } from '../../src/checks/registry.js';
import type { Finding } from '../../src/findings.js';

/** The generated universes carry no vendor file; vendor_inconsistent is proven by its own unit tests. */
const FEED_CHECK_IDS = CHECK_IDS.filter((id) => id !== 'vendor_inconsistent');

const SEEDS = [101, 202, 303, 404, 505];

const runs: Array<{ universe: Universe; findings: Finding[] }> = SEEDS.map((seed) => {
  const universe = generateUniverse({ seed });
  return { universe, findings: runChecks(universe) };
});


describe(`recall and precision on invented universes (seeds ${SEEDS.join(', ')})`, () => {
  const pooled = poolScores(runs);
  console.table(scoreTable(pooled));

  it('plants every kind of fault the catalogue looks for', () => {
    for (const id of FEED_CHECK_IDS) expect(pooled.get(id)?.planted ?? 0, id).toBeGreaterThanOrEqual(20);
  });

  it.each(FEED_CHECK_IDS.map((id) => [id]))('%s finds at least 95 % of its planted faults, and at least 95 % of its alarms are real', (id) => {
    const score = pooled.get(id)!;
    expect(score.found / score.planted).toBeGreaterThanOrEqual(0.95);
    expect(score.real / score.findings).toBeGreaterThanOrEqual(0.95);
  });

  it('explains announced splits and distributions instead of raising alarms', () => {
    for (const { universe, findings } of runs) {
      for (const event of universe.legitimate.filter((e) => e.kind === 'announced_split' || e.kind === 'announced_distribution')) {
        const onThatDay = findings.filter((f) => f.series_id === event.series_id && f.start === event.date);
        expect(onThatDay.filter((f) => f.severity !== 'info'), `${event.kind} ${event.series_id} ${event.date}`).toEqual([]);
        if (event.kind === 'announced_split') expect(onThatDay.map((f) => f.check)).toEqual(['split_like_jump']);
      }
    }
  });

  it('raises nothing on accruing money-market funds that carry no planted fault', () => {
    for (const { universe, findings } of runs) {
      const faulted = new Set(universe.faults.map((f) => f.series_id));
      for (const event of universe.legitimate.filter((e) => e.kind === 'accruing_money_market' && !faulted.has(e.series_id))) {
        expect(findings.filter((f) => f.series_id === event.series_id)).toEqual([]);
      }
    }
  });

  it('gives the same findings, keys included, when run twice', () => {
    const [{ universe, findings }] = runs;
    expect(runChecks(generateUniverse({ seed: SEEDS[0] }))).toEqual(findings);
    expect(new Set(findings.map((f) => f.key)).size).toBe(findings.length);
    expect(universe.faults.length).toBeGreaterThan(90);
  });
});
