import { readFileSync } from 'node:fs';
import { dirname, relative, resolve } from 'node:path';
import { z } from 'zod';
import { parseIsoDate } from '../calendar/days.js';
import { ConfigError, InputError } from '../ingest/errors.js';
import type { FeedPaths, FeedProfiles } from '../ingest/feed.js';
import { FeedProfileSchema, type FeedProfile } from '../ingest/profile.js';
import { FILE_KINDS, type FileKind } from '../ingest/schema.js';
import { CheckSettingsSchema, type CheckSettings } from '../checks/settings.js';
import { MethodologySchema } from '../metrics/methodology.js';
import { OUTPUT_FORMATS } from '../report/render.js';
import { parseYaml, validateYaml } from './yaml-errors.js';

/**
 * The run configuration: one YAML file that says where a feed's files are, how each vendor
 * writes them (profiles), which checks and methodology apply, and where reports go.
 */
const isoDate = z.string().refine((text) => parseIsoDate(text) !== null, 'must be a date written YYYY-MM-DD');

const FileEntrySchema = z.union([
  z.string().min(1),
  z.object({ path: z.string().min(1), profile: z.string().min(1).optional() }).strict(),
]);

const WINDOW_LABEL = /^[1-9]\d*[my]$/;

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
    windows: z.array(z.string().regex(WINDOW_LABEL, 'must be a window such as 1y, 3y or 6m')).min(1).default(['1y', '3y', '5y']),
    output: z
      .object({
        dir: z.string().min(1).default('navassay-report'),
        formats: z.array(z.enum(OUTPUT_FORMATS)).min(1).default(['json', 'html']),
      })
      .strict()
      .default({ dir: 'navassay-report', formats: ['json', 'html'] }),
    fail_on: z.enum(['info', 'warning', 'error', 'critical', 'none']).default('error'),
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
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    throw new InputError(`${path}: cannot open the run configuration; check the path.`);
  }
  const yaml = parseYaml(text, path);
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
      const chosen = file.profiles[profile];
      if (!chosen) {
        const known = Object.keys(file.profiles).join(', ') || 'none';
        throw new ConfigError(
          `${path}, line ${yaml.lineOf(['files', kind, 'profile'])}: files.${kind}.profile names "${profile}", which is not under profiles (defined: ${known}); define it or fix the name.`,
        );
      }
      profiles[kind] = chosen;
    }
  }
  return {
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
}
