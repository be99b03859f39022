import { type Command, Option } from 'commander';
import { formatIsoDate, parseIsoDate, todayEpochDay } from '../calendar/days.js';
import { isSeverity, type Severity } from '../findings.js';
import { ConfigError } from '../ingest/errors.js';
import { OUTPUT_FORMATS, type OutputFormat } from '../report/render.js';
import { loadRunConfig } from '../config/run-config.js';
import type { LoadOptions } from '../ingest/feed.js';
import { loadOptionsOf } from '../job/daily-job.js';

/** Options several commands share, with one parser each so every command reads them alike. */
export const formatOption = () =>
  new Option('--format <format>', 'output format (default: table on a terminal, json otherwise)').choices(OUTPUT_FORMATS);
export const outOption = () => new Option('--out <path>', 'write the report to a file instead of standard output');
export const failOnOption = () =>
  new Option('--fail-on <severity>', 'exit 1 when a finding is at or above this severity')
    .choices(['info', 'warning', 'error', 'critical', 'none'])
    .default('error');
export const asOfOption = (what: string) => new Option('--as-of <date>', `as-of date, YYYY-MM-DD (default: ${what})`);

/** Adds the files risk figures are computed from, shared by `metrics` and `reconcile`. */
export function withFigureInputs(command: Command): Command {
  for (const option of figureInputOptions()) command.addOption(option);
  return command;
}

const figureInputOptions = (): Option[] => [
  new Option('--nav <file>', 'NAV feed (series_id, date, nav)').makeOptionMandatory(),
  new Option('--benchmarks <file>', 'benchmark levels (benchmark_id, date, level)').makeOptionMandatory(),
  new Option('--master <file>', 'series master (series_id, benchmark_id, [rate_id] …)').makeOptionMandatory(),
  new Option('--rates <file>', "risk-free rates (rate_id, date, rate), matched by the master's rate_id").conflicts('rf'),
  new Option('--rf <rate>', "a constant annual risk-free rate as a decimal, such as 0.02 (with neither --rates nor --rf the rate is zero, and the answer's methodology says risk_free: none)"),
  new Option('--actions <file>', 'corporate actions: NAVs are adjusted for the splits and distributions it lists, so returns are total returns'),
];

export const threadsOption = () =>
  new Option('--threads <count>', "threads for the checks, the main one included (default: the configuration's threads, else one per core, at most 8)");

/** A positive whole number of threads, or undefined when the option is absent. */
export function parseThreads(text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const count = Number(text);
  if (!Number.isInteger(count) || count < 1 || count > 64) throw new ConfigError(`--threads "${text}" is not a whole number from 1 to 64; give for example --threads 2.`);
  return count;
}

export const profilesOption = () =>
  new Option('--config <file>', "read each file with the feed profile its kind has in this run configuration (and the configuration's weekend)");

export { loadOptionsOf };

/** Feed profiles, weekend and limits from a run configuration, for commands given files one by one. */
export function loadOptionsFrom(configPath: string | undefined, asOf?: number): LoadOptions {
  return loadOptionsOf(configPath === undefined ? undefined : loadRunConfig(configPath), asOf);
}

export function chosenFormat(format: string | undefined): OutputFormat {
  if (format) return format as OutputFormat;
  return process.stdout.isTTY ? 'table' : 'json';
}

export function parseAsOf(text: string | undefined, fallback: () => number = todayEpochDay): number {
  if (text === undefined) return fallback();
  const day = parseIsoDate(text);
  if (day === null) throw new ConfigError(`--as-of "${text}" is not a date; write it as YYYY-MM-DD, for example ${formatIsoDate(todayEpochDay())}.`);
  return day;
}

export function parseFailOn(text: string): Severity | 'none' {
  if (text === 'none' || isSeverity(text)) return text;
  throw new ConfigError(`--fail-on "${text}" is not a severity; use info, warning, error, critical or none.`);
}
