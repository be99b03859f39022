/**
 * Run settings for the checks, as the YAML configuration embeds them:
 *
 * ```yaml
 * run:                       # every series
 *   date_shift: { enabled: false }
 *   stale_value: { min_days: 4 }
 * categories:                # series whose master category matches (case-insensitive)
 *   Money Market: { stale_value: { enabled: false } }
 * series:                    # one series
 *   S0001: { late_series: { max_lag_business_days: 3 } }
 * ```
 *
 * A series' parameters are its check's defaults, overridden by `run`, then by its category,
 * then by its own entry. Feed-level checks (`unparseable_row`, `unknown_series`,
 * `dropped_rows`, `invalid_identifier`) only read `run`. Unknown check ids and parameters,
 * and values of the wrong type, are refused with the path of the bad key.
 */
import { z } from 'zod';
import type { Check, CheckParams } from './check.js';
import { CHECKS } from './registry.js';
import type { CheckSettings } from './settings-resolver.js';

function overrideSchema(check: Check) {
  const shape: Record<string, z.ZodType> = { enabled: z.boolean().optional() };
  for (const [name, value] of Object.entries(check.defaults as CheckParams)) {
    shape[name] = (typeof value === 'number' ? z.number().finite() : typeof value === 'boolean' ? z.boolean() : z.string()).optional();
  }
  return z.strictObject(shape);
}

const checkOverrides = z.strictObject(Object.fromEntries(CHECKS.map((check) => [check.id, overrideSchema(check).optional()])));

export const CheckSettingsSchema = z.strictObject({
  run: checkOverrides.optional(),
  categories: z.record(z.string(), checkOverrides).optional(),
  series: z.record(z.string(), checkOverrides).optional(),
});

export type { CheckOverride, CheckOverrides, CheckSettings } from './settings-resolver.js';

export class CheckSettingsError extends Error {}

/** Validates settings, throwing one error whose message names every bad key path. */
export function parseCheckSettings(input: unknown): CheckSettings {
  const result = CheckSettingsSchema.safeParse(input ?? {});
  if (result.success) return result.data as CheckSettings;
  const problems = result.error.issues.map((issue) => {
    const path = issue.path.map(String);
    const keys = issue.code === 'unrecognized_keys' ? issue.keys : [];
    const where = keys.length > 0 ? keys.map((key) => [...path, key].join('.')).join(', ') : path.join('.') || '(top level)';
    return issue.code === 'unrecognized_keys' ? `unknown key ${where}${hint(path)}` : `${where}: ${issue.message}`;
  });
  throw new CheckSettingsError(`Invalid check settings: ${problems.join('; ')}.`);
}

function hint(path: string[]): string {
  const checkId = path.length >= 1 ? path[path.length - 1] : undefined;
  const check = CHECKS.find((c) => c.id === checkId);
  if (check) return ` (parameters of ${check.id}: ${['enabled', ...Object.keys(check.defaults)].join(', ')})`;
  const atCheckLevel = path.length === 1 ? path[0] === 'run' : path.length === 2 && (path[0] === 'categories' || path[0] === 'series');
  return atCheckLevel ? ` (check ids: ${CHECKS.map((c) => c.id).join(', ')})` : path.length === 0 ? ' (allowed: run, categories, series)' : '';
}

export { SettingsResolver, type ResolvedCheck } from './settings-resolver.js';
