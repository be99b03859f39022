import { statSync } from 'node:fs';
import { dirname, relative, resolve } from 'node:path';
import { z } from 'zod';
import { parseIsoDate } from '../calendar/days.js';
import { ConfigError, quoteInput } from '../ingest/errors.js';
import { readInputFile } from '../ingest/input-file.js';
import { MAX_CONFIG_BYTES_VARIABLE, maxConfigBytes } from '../ingest/limits.js';
import { LimitsSchema } from '../ingest/limits-schema.js';
import type { FeedPaths, FeedProfiles } from '../ingest/feed.js';
import { FeedProfileSchema, type FeedProfile } from '../ingest/profile.js';
import { FILE_KINDS, type FileKind } from '../ingest/schema.js';
import { CheckSettingsSchema, type CheckSettings } from '../checks/settings.js';
import { MethodologySchema } from '../metrics/methodology.js';
import { isWindowLabel } from '../metrics/windows.js';
import { ToleranceSettingsSchema } from '../reconcile/tolerances.js';
import { OUTPUT_FORMATS } from '../report/render.js';
import { checkOutputsApart, namedInputs, runOutputFiles, type NamedPath } from './output-paths.js';
import { parseYaml, validateYaml, type LocatedYaml } from './yaml-errors.js';

/**
 * The run configuration: one YAML file that says where a feed's files are, how each vendor
 * writes them (profiles), which checks and methodology apply, and where reports go.
 */
const isoDate = z.string().refine((text) => parseIsoDate(text) !== null, 'must be a date written YYYY-MM-DD');

const FileEntrySchema = z.union([
  z.string().min(1),
  z.object({ path: z.string().min(1), profile: z.string().min(1).optional() }).strict(),
]);


export const RunConfigSchema = z
  .object({
    /** The feed's name in the snapshot store. */
    feed: z.string().regex(/^[A-Za-z0-9._-]+$/, 'must use letters, digits, dot, dash or underscore').default('feed'),
    as_of: isoDate.optional(),
    /** Snapshot store directory, relative to the configuration file. */
    store: z.string().min(1).default('navassay-store'),
    files: z
      .object({
        nav: FileEntrySchema,
        benchmarks: FileEntrySchema.optional(),
        master: FileEntrySchema.optional(),
        rates: FileEntrySchema.optional(),
        holidays: FileEntrySchema.optional(),
        actions: FileEntrySchema.optional(),
        vendor: FileEntrySchema.optional(),
      })
      .strict(),
    /** A previous NAV file to compare with; by default the store's latest earlier snapshot. */
    previous: z.string().min(1).optional(),
    /** The acknowledgement file the team edits (YAML), relative to the configuration file. */
    acknowledgements: z.string().min(1).optional(),
    profiles: z.record(z.string(), FeedProfileSchema).default({}),
    /** ISO weekdays that are not business days (6 = Saturday, 7 = Sunday). */
    weekend: z.array(z.number().int().min(1).max(7)).default([6, 7]),
    checks: CheckSettingsSchema.default({}),
    methodology: MethodologySchema.default(MethodologySchema.parse({})),
    /** Reconciliation of the vendor file (files.vendor): tolerances per metric, category and series. */
    reconcile: z.strictObject({ tolerances: ToleranceSettingsSchema.default({}) }).default({ tolerances: {} }),
    windows: z.array(z.string().refine(isWindowLabel, 'must be a window such as 1y, 3y or 6m')).min(1).default(['1y', '3y', '5y']),
    output: z
      .object({
        dir: z.string().min(1).default('navassay-report'),
        formats: z.array(z.enum(OUTPUT_FORMATS)).min(1).default(['json', 'html']),
      })
      .strict()
      .default({ dir: 'navassay-report', formats: ['json', 'html'] }),
    fail_on: z.enum(['info', 'warning', 'error', 'critical', 'none']).default('error'),
    /** Threads for the checks, the main one included (so one fewer worker threads); by default one per available core (at most 8). */
    threads: z.number().int().min(1).max(64).optional(),
    /** Sizes, widths and the plausible date range the readers hold inputs to (docs/ingestion.md). */
    limits: LimitsSchema.default(LimitsSchema.parse({})),
  })
  .strict();

export type RunConfigFile = z.output<typeof RunConfigSchema>;

/** A validated configuration with every path resolved against the configuration's directory. */
export interface RunConfig extends Omit<RunConfigFile, 'files' | 'profiles' | 'checks'> {
  readonly checks: CheckSettings;
  readonly path: string;
  readonly paths: FeedPaths;
  readonly profiles: FeedProfiles;
}

export function loadRunConfig(path: string): RunConfig {
  const text = readConfigText(path);
  const yaml = parseYaml(text, path);
  checkProfileNames(yaml);
  const file = validateYaml(yaml, RunConfigSchema);
  const base = dirname(resolve(path));
  // Paths are kept relative to the working directory when they can be, so reports name files as a person would.
  const at = (written: string) => relative(process.cwd(), resolve(base, written)) || '.';
  const paths: Partial<Record<FileKind, string>> = {};
  const profiles: Partial<Record<FileKind, FeedProfile>> = {};
  for (const kind of FILE_KINDS) {
    const entry = file.files[kind];
    if (entry === undefined) continue;
    const { path: filePath, profile } = typeof entry === 'string' ? { path: entry, profile: undefined } : entry;
    paths[kind] = at(filePath);
    if (profile !== undefined) {
      const chosen = Object.hasOwn(file.profiles, profile) ? file.profiles[profile] : undefined;
      if (!chosen) {
        const known = Object.keys(file.profiles).map((name) => quoteInput(name, 40)).join(', ') || 'none';
        throw new ConfigError(
          `${path}, line ${yaml.lineOf(['files', kind, 'profile'])}: files.${kind}.profile names ${quoteInput(profile)}, which is not under profiles (defined: ${known}); define it or fix the name.`,
        );
      }
      profiles[kind] = chosen;
    }
  }
  const config: RunConfig = {
    ...file,
    checks: file.checks as CheckSettings,
    path,
    paths: paths as FeedPaths,
    profiles,
    store: at(file.store),
    previous: file.previous === undefined ? undefined : at(file.previous),
    acknowledgements: file.acknowledgements === undefined ? undefined : at(file.acknowledgements),
    output: { ...file.output, dir: at(file.output.dir) },
  };
  checkOutputsApart(path, runInputs(config), runOutputFiles(config.output.dir, config.output.formats), [{ key: 'store', path: config.store }]);
  return config;
}

/** Every file a run reads, each named by its configuration key. */
export function runInputs(config: Pick<RunConfig, 'paths' | 'previous'>): NamedPath[] {
  const inputs = namedInputs(config.paths, 'files.');
  return config.previous === undefined ? inputs : [...inputs, { key: 'previous', path: config.previous }];
}

/**
 * The configuration's text, read only from a regular file and only up to its size limit: a
 * 56 MB YAML file would take gigabytes to parse. The limit cannot be raised from inside the file
 * it limits, so it is set by an environment variable.
 */
function readConfigText(path: string): string {
  const limit = maxConfigBytes();
  let size = 0;
  try {
    size = statSync(path).size;
  } catch {
    // readInputFile below explains a missing or unreadable file
  }
  if (size > limit) {
    throw new ConfigError(
      `${path}: the run configuration is ${size} bytes, more than the limit of ${limit}; a configuration is a few kilobytes, so check that this is the right file (set ${MAX_CONFIG_BYTES_VARIABLE} to raise the limit).`,
    );
  }
  return readInputFile(path, limit, 'the run configuration').toString('utf8');
}

/**
 * Profile names become keys of a plain object; names that plain objects already carry
 * (`__proto__`, `constructor`, `toString` …) would change the object itself or be found where no
 * profile was defined, so they are refused with the line.
 */
function checkProfileNames(yaml: LocatedYaml): void {
  const value = yaml.value as { profiles?: unknown } | null;
  const profiles = value && typeof value === 'object' ? value.profiles : undefined;
  if (!profiles || typeof profiles !== 'object') return;
  for (const name of Object.getOwnPropertyNames(profiles)) {
    if (name in Object.prototype) {
      throw new ConfigError(
        `${yaml.file}, line ${yaml.lineOf(['profiles', name])}: profiles.${name}: the name ${quoteInput(name)} is reserved; give the profile another name.`,
      );
    }
  }
}
