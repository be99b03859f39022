import { Command } from 'commander';
import { checkOutputsApart, namedInputs } from '../../config/output-paths.js';
import type { FeedPaths } from '../../ingest/feed.js';
import { loadDay } from '../../job/day.js';
import { checkStage } from '../../job/stages/checks.js';
import { checkView, failsOn } from '../../report/check-answer.js';
import { renderInPieces } from '../../report/render.js';
import { asOfOption, chosenFormat, failOnOption, formatOption, loadOptionsFrom, outOption, parseAsOf, parseFailOn, profilesOption } from '../options.js';
import { emit, quarantinePathFor, writeQuarantine } from '../output.js';

interface CheckOptions {
  nav: string;
  benchmarks?: string;
  master?: string;
  holidays?: string;
  actions?: string;
  previous?: string;
  vendor?: string;
  asOf?: string;
  format?: string;
  out?: string;
  failOn: string;
  config?: string;
}

export function checkCommand(): Command {
  return new Command('check')
    .description("validate a day's NAV feed: gaps, stale values, jumps, misdated rows, duplicates, restatements")
    .requiredOption('--nav <file>', 'NAV feed (series_id, date, nav)')
    .option('--benchmarks <file>', 'benchmark levels (benchmark_id, date, level)')
    .option('--master <file>', 'series master (series_id, benchmark_id, …)')
    .option('--holidays <file>', 'holidays (calendar, date)')
    .option('--actions <file>', 'corporate actions (series_id, ex_date, kind, value)')
    .option('--vendor <file>', "the vendor's risk figures, judged for impossible and contradictory values")
    .option('--previous <file>', "the previous snapshot's NAV file, to find restated and dropped rows")
    .addOption(profilesOption())
    .addOption(asOfOption('today'))
    .addOption(formatOption())
    .addOption(outOption())
    .addOption(failOnOption())
    .action(async (options: CheckOptions) => {
      process.exitCode = await runCheckCommand(options);
    });
}

async function runCheckCommand(options: CheckOptions): Promise<number> {
  const asOf = parseAsOf(options.asOf);
  const failOn = parseFailOn(options.failOn);
  const paths: FeedPaths = {
    nav: options.nav,
    benchmarks: options.benchmarks,
    master: options.master,
    holidays: options.holidays,
    actions: options.actions,
    vendor: options.vendor,
  };
  if (options.out !== undefined) {
    const inputs = namedInputs({ ...paths, previous: options.previous });
    const outputs = [{ key: '--out', path: options.out }, { key: '--out', path: quarantinePathFor(options.out) }];
    checkOutputsApart('--out', inputs, outputs);
  }
  const load = loadOptionsFrom(options.config, asOf);
  const previous = options.previous === undefined ? undefined : ({ kind: 'file', path: options.previous, profile: load.profiles?.nav } as const);
  const day = await loadDay({ paths, asOf, load, previous });
  const answer = await checkStage(day);
  emit(renderInPieces(chosenFormat(options.format), answer, () => checkView(answer)), options.out);
  if (options.out !== undefined && day.feed.rejected.length > 0) writeQuarantine(quarantinePathFor(options.out), day.feed.rejected);
  return failsOn(answer.findings, failOn) ? 1 : 0;
}
