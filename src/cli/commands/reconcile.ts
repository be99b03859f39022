import { Command } from 'commander';
import { todayEpochDay } from '../../calendar/days.js';
import { checkOutputsApart, namedInputs } from '../../config/output-paths.js';
import { loadRunConfig } from '../../config/run-config.js';
import { severityRank } from '../../findings.js';
import { loadDay } from '../../job/day.js';
import { checkStage } from '../../job/stages/checks.js';
import { reconcileStage } from '../../job/stages/reconcile.js';
import { DEFAULT_METHODOLOGY } from '../../metrics/methodology.js';
import type { ReconcileAnswer } from '../../reconcile/reconcile.js';
import { loadToleranceFile } from '../../reconcile/tolerance-file.js';
import { reconcileView } from '../../report/reconcile-answer.js';
import { renderInPieces } from '../../report/render.js';
import { asOfOption, withFigureInputs, chosenFormat, failOnOption, formatOption, loadOptionsOf, outOption, parseAsOf, parseFailOn, profilesOption } from '../options.js';
import { emit } from '../output.js';
import { chosenMethodology, parseRate } from './metrics.js';

interface ReconcileOptions {
  nav: string;
  benchmarks: string;
  master: string;
  vendor: string;
  rates?: string;
  rf?: string;
  actions?: string;
  config?: string;
  tolerances?: string;
  asOf?: string;
  format?: string;
  out?: string;
  failOn: string;
}

export function reconcileCommand(): Command {
  return withFigureInputs(new Command('reconcile').description("judge every vendor figure against navassay's (match, rounding, breach, not_computable) and explain each breach"))
    .requiredOption('--vendor <file>', 'vendor figures (series_id, as_of, window, metric, value, [unit])')
    .addOption(profilesOption())
    .option('--tolerances <file>', 'tolerances per metric, category and series (YAML: run, categories, series); replaces the configuration\'s')
    .addOption(asOfOption("every as-of in the vendor file; with a date, only the vendor's figures of that date"))
    .addOption(formatOption())
    .addOption(outOption())
    .addOption(failOnOption())
    .action(async (options: ReconcileOptions) => {
      process.exitCode = await runReconcileCommand(options);
    });
}

async function runReconcileCommand(options: ReconcileOptions): Promise<number> {
  const config = options.config === undefined ? undefined : loadRunConfig(options.config);
  const constantRate = options.rf === undefined ? undefined : parseRate(options.rf);
  const asOf = options.asOf === undefined ? undefined : parseAsOf(options.asOf);
  const failOn = parseFailOn(options.failOn);
  const tolerances = options.tolerances === undefined ? config?.reconcile.tolerances : loadToleranceFile(options.tolerances);
  const methodology = chosenMethodology(config?.methodology ?? DEFAULT_METHODOLOGY, [], options.rates !== undefined || constantRate !== undefined);
  const paths = { nav: options.nav, benchmarks: options.benchmarks, master: options.master, rates: options.rates, actions: options.actions, vendor: options.vendor };
  if (options.out !== undefined) {
    checkOutputsApart('--out', namedInputs({ ...paths, tolerances: options.tolerances, config: options.config }), [{ key: '--out', path: options.out }]);
  }
  const loaded = await loadDay({ paths, asOf: asOf ?? todayEpochDay(), load: loadOptionsOf(config, asOf), constantRate });
  // The checks judge the data as of its own last day unless told otherwise, so nothing in it is "future".
  const day = asOf === undefined ? { ...loaded, asOf: lastDay(loaded.feed.nav.dates) } : loaded;
  const findings = (await checkStage(day, config?.checks)).findings;
  const answer = reconcileStage(day, findings, { methodology, tolerances, asOf })!; // vendor, benchmarks and master are required options
  emit(renderInPieces(chosenFormat(options.format), answer, () => reconcileView(answer)), options.out);
  return reconcileFailsOn(answer, failOn) ? 1 : 0;
}

/** Exit status 1 when a figure's severity (a breach is an error) is at or above the fail-on severity. */
export function reconcileFailsOn(answer: ReconcileAnswer, failOn: string): boolean {
  if (failOn === 'none') return false;
  const threshold = severityRank(failOn as Parameters<typeof severityRank>[0]);
  return answer.results.some((result) => severityRank(result.severity) >= threshold);
}

function lastDay(dates: Int32Array): number {
  let last = 0;
  for (const day of dates) if (day > last) last = day;
  return last;
}
