import { Command } from 'commander';
import { lastMonthEndOnOrBefore, todayEpochDay } from '../../calendar/days.js';
import { ConfigError } from '../../ingest/errors.js';
import { loadDay } from '../../job/day.js';
import { checkStage } from '../../job/stages/checks.js';
import { metricsStage } from '../../job/stages/metrics.js';
import { DEFAULT_METHODOLOGY, MethodologyChangesSchema, withChanges, type Methodology, type MethodologyChanges } from '../../metrics/methodology.js';
import { loadRunConfig } from '../../config/run-config.js';
import { parseWindow } from '../../metrics/windows.js';
import { metricsView } from '../../report/metrics-answer.js';
import { renderInPieces } from '../../report/render.js';
import { asOfOption, withFigureInputs, chosenFormat, formatOption, loadOptionsOf, outOption, parseAsOf, profilesOption } from '../options.js';
import { annualizationNotices, printNotices } from '../notices.js';
import { emit } from '../output.js';

interface MetricsOptions {
  nav: string;
  benchmarks: string;
  master: string;
  rates?: string;
  rf?: string;
  actions?: string;
  config?: string;
  set: string[];
  asOf?: string;
  windows?: string;
  format?: string;
  out?: string;
}

export function metricsCommand(): Command {
  return withFigureInputs(new Command('metrics').description('recompute risk figures from NAVs, benchmark levels and the risk-free rate (default methodology: monthly)'))
    .addOption(profilesOption())
    .option('--set <dimension=value>', 'change one methodology setting, such as sd_denominator=population or frequency=weekly (repeatable; see docs/methodology.md)', collect, [])
    .addOption(asOfOption('the last month-end on or before today'))
    .option('--windows <list>', "comma-separated windows such as 1y,3y,5y or 6m (default: the configuration's windows, else 1y,3y,5y)")
    .addOption(formatOption())
    .addOption(outOption())
    .action(async (options: MetricsOptions) => {
      process.exitCode = await runMetricsCommand(options);
    });
}

async function runMetricsCommand(options: MetricsOptions): Promise<number> {
  const asOf = parseAsOf(options.asOf, () => lastMonthEndOnOrBefore(todayEpochDay()));
  const constantRate = options.rf === undefined ? undefined : parseRate(options.rf);
  const config = options.config === undefined ? undefined : loadRunConfig(options.config);
  const windows = options.windows === undefined ? (config?.windows ?? DEFAULT_WINDOWS) : parseWindowList(options.windows);
  const methodology = chosenMethodology(config?.methodology ?? DEFAULT_METHODOLOGY, options.set, options.rates !== undefined || constantRate !== undefined);
  printNotices(annualizationNotices(methodology));
  const paths = { nav: options.nav, benchmarks: options.benchmarks, master: options.master, rates: options.rates, actions: options.actions };
  const day = await loadDay({ paths, asOf, load: loadOptionsOf(config, asOf), constantRate });
  // A figure whose window holds an error-level finding of the checks carries the finding keys.
  const findings = (await checkStage(day, config?.checks)).findings;
  const answer = metricsStage(day, { asOf, windows, methodology }, findings)!; // benchmarks and master are required options
  emit(renderInPieces(chosenFormat(options.format), answer, () => metricsView(answer)), options.out);
  return 0;
}

const DEFAULT_WINDOWS = ['1y', '3y', '5y'];

function collect(value: string, previous: string[]): string[] {
  return [...previous, value];
}

/**
 * The configured (or default) methodology with the --set changes applied. With neither a rate
 * file nor a constant rate, a methodology that wants the master's rate series uses none.
 */
export function chosenMethodology(base: Methodology, settings: readonly string[], rateGiven: boolean): Methodology {
  const changes = parseSettings(settings);
  const methodology = withChanges(base, changes);
  return !rateGiven && methodology.risk_free.source === 'series' ? { ...methodology, risk_free: { source: 'none' } } : methodology;
}

const NUMERIC_DIMENSIONS = new Set(['annualization', 'window_end']);
/** Dimensions that take a name or a number (`mar=zero`, `mar=0.02`). */
const NAME_OR_NUMBER_DIMENSIONS = new Set(['mar']);
const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i;

function settingValue(dimension: string, value: string): unknown {
  if (NUMERIC_DIMENSIONS.has(dimension)) return Number(value);
  if (NAME_OR_NUMBER_DIMENSIONS.has(dimension) && NUMBER.test(value)) return Number(value);
  return value === 'null' ? null : value;
}

function parseSettings(settings: readonly string[]): MethodologyChanges {
  const raw: Record<string, unknown> = {};
  for (const setting of settings) {
    const match = /^([a-z_]+)=(.+)$/.exec(setting.trim());
    if (!match) throw new ConfigError(`--set "${setting}" is not dimension=value; write for example --set sd_denominator=population.`);
    const [, dimension, value] = match;
    raw[dimension] = settingValue(dimension, value);
  }
  const result = MethodologyChangesSchema.safeParse(raw);
  if (result.success) return result.data as MethodologyChanges;
  const issue = result.error.issues[0];
  const where = issue.code === 'unrecognized_keys' ? issue.keys.join(', ') : issue.path.join('.');
  const problem =
    issue.code === 'unrecognized_keys'
      ? `is not a methodology dimension; the dimensions are ${Object.keys(MethodologyChangesSchema.shape).join(', ')}`
      : issue.code === 'invalid_value'
        ? `must be one of ${issue.values.join(', ')}`
        : issue.message.replace(/^Invalid input: /, '');
  throw new ConfigError(`--set ${where}: ${problem}.`);
}


export function parseWindowList(text: string): string[] {
  const windows = text.split(',').map((label) => label.trim()).filter(Boolean);
  const bad = windows.find((label) => parseWindow(label) === null);
  if (bad !== undefined || windows.length === 0) {
    throw new ConfigError(`--windows "${text}" is not a list of windows; write whole years or months separated by commas, such as 1y,3y,5y or 6m.`);
  }
  return windows;
}

export function parseRate(text: string): number {
  const rate = Number(text);
  if (text.trim() === '' || !Number.isFinite(rate) || Math.abs(rate) >= 1) {
    throw new ConfigError(`--rf "${text}" is not an annual rate as a decimal; write 0.02 for 2 %.`);
  }
  return rate;
}
