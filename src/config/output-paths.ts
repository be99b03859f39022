import { realpathSync, statSync } from 'node:fs';
import { isAbsolute, join, relative, resolve } from 'node:path';
import { ConfigError } from '../ingest/errors.js';
import { onPseudoFileSystem } from '../ingest/input-file.js';
import { DAILY_FILES } from '../report/daily/write-daily.js';
import type { OutputFormat } from '../report/render.js';

/**
 * The rule that no run writes over what it reads. Reports, the quarantine and snapshots go only
 * where the configuration (or the command line) sends them, under names fixed here; before
 * anything is read, each of those files is compared with every input (by path, and by device and
 * inode, so a link or a second name for the same file is caught), and no input may lie inside the
 * store, whose directories a write replaces. A clash is a ConfigError (exit 2) naming both keys.
 */

/** A path and the configuration key or option it came from, such as `files.nav` or `--out`. */
export interface NamedPath {
  readonly key: string;
  readonly path: string;
}

const REPORT_EXTENSIONS: Record<OutputFormat, string> = { json: 'json', html: 'html', markdown: 'md', csv: 'csv', table: 'txt' };

/** The file a run's report of one kind and format is written to, inside `output.dir`. */
export function reportFileName(report: 'check' | 'metrics' | 'reconcile', format: OutputFormat): string {
  return `${report}.${REPORT_EXTENSIONS[format]}`;
}

export const QUARANTINE_FILE = 'quarantine.csv';

/**
 * The input paths a command was given, each named by its key (`--nav`, or `files.nav` with the
 * prefix `files.`); absent inputs are left out.
 */
export function namedInputs(paths: Readonly<Record<string, string | undefined>>, prefix = '--'): NamedPath[] {
  return Object.entries(paths)
    .filter((entry): entry is [string, string] => entry[1] !== undefined)
    .map(([kind, path]) => ({ key: `${prefix}${kind}`, path }));
}

/**
 * Every file a run writes into its output directory, each named by the key that decides it: the
 * commands' answers, the day's report, tickets and figures (DAILY_FILES), and the quarantine.
 */
export function runOutputFiles(dir: string, formats: readonly OutputFormat[]): NamedPath[] {
  const files = formats.flatMap((format) => [
    { key: 'output.dir', path: join(dir, reportFileName('check', format)) },
    { key: 'output.dir', path: join(dir, reportFileName('metrics', format)) },
    { key: 'output.dir', path: join(dir, reportFileName('reconcile', format)) },
  ]);
  const daily = Object.values(DAILY_FILES).map((name) => ({ key: 'output.dir', path: join(dir, name) }));
  return [...files, ...daily, { key: 'output.dir', path: join(dir, QUARANTINE_FILE) }];
}

/**
 * Throws a ConfigError when an output would land on an input, or an input lies inside a
 * directory whose contents a write replaces (the store). `where` starts the message, such as
 * the configuration file's name.
 */
export function checkOutputsApart(
  where: string,
  inputs: readonly NamedPath[],
  outputs: readonly NamedPath[],
  replacedDirs: readonly NamedPath[] = [],
): void {
  for (const output of [...outputs, ...replacedDirs]) {
    if (onPseudoFileSystem(output.path)) {
      throw new ConfigError(`${where}: ${output.key} (${output.path}) is on a system pseudo file system (/proc, /sys or /dev); point it at an ordinary directory.`);
    }
  }
  for (const output of outputs) {
    for (const input of inputs) {
      if (sameFile(output.path, input.path)) {
        throw new ConfigError(
          `${where}: ${output.key} would write ${output.path}, which is the input ${input.key}; send the output to another directory or file so the input is never overwritten.`,
        );
      }
    }
  }
  for (const dir of replacedDirs) {
    for (const input of inputs) {
      if (isInside(input.path, dir.path)) {
        throw new ConfigError(
          `${where}: the input ${input.key} (${input.path}) lies inside ${dir.key} (${dir.path}), whose contents navassay writes and replaces; keep inputs outside it.`,
        );
      }
    }
  }
}

/** The same file: the same absolute path, or (when both exist) the same device and inode. */
export function sameFile(a: string, b: string): boolean {
  if (resolve(a) === resolve(b)) return true;
  const statA = statOrNull(a);
  const statB = statOrNull(b);
  return statA !== null && statB !== null && statA.dev === statB.dev && statA.ino === statB.ino;
}

function statOrNull(path: string): { dev: number; ino: number } | null {
  try {
    return statSync(path);
  } catch {
    return null;
  }
}

/** True when `path` is `dir` itself or lies below it, following links where the paths exist. */
export function isInside(path: string, dir: string): boolean {
  const inside = (p: string, d: string) => {
    const rel = relative(d, p);
    return rel === '' || (!rel.startsWith('..') && !isAbsolute(rel));
  };
  return inside(resolve(path), resolve(dir)) || inside(real(path), real(dir));
}

function real(path: string): string {
  try {
    return realpathSync(path);
  } catch {
    return resolve(path);
  }
}
