import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { generateUniverse } from '../../fixtures/universe/generate.js';
import { generateAltUniverse } from '../../fixtures/universe-alt/generate.js';
import { lastMonthEndOnOrBefore } from '../../src/calendar/days.js';
import { runChecks } from '../../src/checks/run.js';
import { computeMetrics } from '../../src/metrics/compute.js';
import { DEFAULT_METHODOLOGY } from '../../src/metrics/methodology.js';
import { checkAnswer } from '../../src/report/check-answer.js';
import { adjustForCorporateActions } from '../../src/series/adjust.js';
import { runCli, scratchDir } from '../cli/run-cli.js';

/**
 * Every command's answers on the demo, the malformed fixtures and the two generated universes,
 * as text. The golden copies in test/golden/answers/ were produced by this function on the code
 * before the job layer (issue 8) and read by eye; the job must reproduce them exactly, except
 * the keys of unreadable rows (see `normalise`).
 */
export async function goldenAnswers(): Promise<Record<string, string>> {
  const answers: Record<string, string> = {};
  delete process.env.COLUMNS; // tables are as wide as the default 140 columns, whatever the terminal
  const dir = scratchDir();
  const at = (name: string) => join(dir, name);
  // The scratch directory, absolute or relative to the working directory, reads <dir>.
  // The times a snapshot or a ticket run was stored read <time>: it is the clock's, not the code's.
  const placed = (text: string) =>
    text.split(dir).join('<dir>').replace(/(?:\.\.\/)*\.\.<dir>/g, '<dir>').split(relative(process.cwd(), dir)).join('<dir>').replace(/(stored at |"recorded_at": ")\d{4}-\d\d-\d\dT[\d:.]+Z/g, '$1<time>');
  const record = async (name: string, ...argv: string[]) => {
    const { status, stdout, stderr } = await runCli(...argv);
    answers[name] = placed(`status ${status}\n--- stderr\n${stderr}--- stdout\n${stdout}`);
  };

  await record('demo.txt', 'demo', '--dir', dir, '--format', 'json');
  for (const name of ['check.json', 'check.csv', 'check.md', 'metrics.json', 'metrics.csv', 'metrics.md', 'quarantine.csv']) {
    answers[`demo-report-${name}.txt`] = placed(readFileSync(join(dir, 'report', name), 'utf8'));
  }
  const config = at('navassay.yaml');
  await record('run-again.txt', 'run', config, '--format', 'json', '--fail-on', 'warning');
  await record('run-table.txt', 'run', config, '--format', 'table');
  const day = ['--nav', at('nav.csv'), '--master', at('master.csv')];
  await record('check-demo.txt', 'check', ...day, '--as-of', '2026-11-30', '--format', 'json');
  await record(
    'check-demo-full.txt',
    'check', ...day, '--config', config, '--benchmarks', at('benchmarks.csv'), '--holidays', at('holidays.csv'), '--actions', at('actions.csv'),
    '--vendor', at('vendor-figures.csv'), '--previous', at('nav-previous.csv'), '--as-of', '2026-11-30', '--format', 'json',
  );
  await record('check-demo-markdown.txt', 'check', ...day, '--as-of', '2026-11-30', '--format', 'markdown');
  const figures = [...day, '--config', config, '--benchmarks', at('benchmarks.csv'), '--actions', at('actions.csv'), '--as-of', '2026-11-30'];
  await record('metrics-demo.txt', 'metrics', ...figures, '--rates', at('rates.csv'), '--format', 'json');
  await record('metrics-demo-rf.txt', 'metrics', ...figures, '--rf', '0.02', '--windows', '6m,2y', '--set', 'frequency=weekly', '--set', 'sd_denominator=population', '--format', 'csv');
  await record('ingest-demo.txt', 'ingest', '--config', config, '--as-of', '2026-11-27', '--format', 'json');

  const malformed = 'fixtures/malformed';
  for (const file of readdirSync(malformed).filter((name) => name.endsWith('.csv')).sort()) {
    await record(`check-malformed-${file}.txt`, 'check', '--nav', join(malformed, file), '--as-of', '2026-11-30', '--format', 'json');
  }

  const universe = generateUniverse({ seed: 7, funds: 40, businessDays: 900 });
  answers['universe-check.json'] = JSON.stringify(checkAnswer(universe.asOf, { read: 0, accepted: 0, rejected: 0 }, runChecks(universe)), null, 2);
  answers['universe-metrics.json'] = JSON.stringify(
    computeMetrics({
      nav: adjustForCorporateActions(universe.nav, universe.actions),
      benchmarks: universe.benchmarks,
      master: universe.master,
      asOf: lastMonthEndOnOrBefore(universe.asOf),
      windows: ['1y', '3y'],
      methodology: DEFAULT_METHODOLOGY,
    }),
    null,
    2,
  );
  const alt = generateAltUniverse({ seed: 11, perKind: 2, cleanFunds: 10 });
  answers['universe-alt-check.json'] = JSON.stringify(checkAnswer(alt.asOf, { read: 0, accepted: 0, rejected: 0 }, runChecks(alt)), null, 2);
  return answers;
}

/** Unreadable-row keys change once (issue 8: 32-bit hash → truncated SHA-256); everything else must not. */
export function normalise(text: string): string {
  return text.replace(/unparseable_row\|([^|"\n]*)\|[0-9a-f]+/g, 'unparseable_row|$1|<hash>');
}
