/**
 * How one series' check parameters are resolved from validated run settings (src/checks/settings.ts
 * validates them): the check's defaults, overridden by `run`, then by the series' category, then
 * by its own entry. Kept apart from the validation so a worker thread, which receives settings
 * already validated, does not load the schema library.
 */
import type { Check, CheckParams } from './check.js';

export type CheckOverride = { enabled?: boolean } & Record<string, number | string | boolean | undefined>;
export type CheckOverrides = Partial<Record<string, CheckOverride>>;
export interface CheckSettings {
  run?: CheckOverrides;
  categories?: Record<string, CheckOverrides>;
  series?: Record<string, CheckOverrides>;
}

export interface ResolvedCheck {
  readonly enabled: boolean;
  readonly params: CheckParams;
}

/** Resolves each check's settings for series, categories and the run, memoising per category. */
export class SettingsResolver {
  private readonly categories: Map<string, CheckOverrides>;
  private readonly memo = new Map<string, ResolvedCheck>();
  /**
   * The same resolutions by the category as the master spells it ('' for none), then check id:
   * asked for every check of every series, the normalised name and the joined key were a cost of
   * their own (new strings to build and hash each time).
   */
  private readonly byCategory = new Map<string, Map<string, ResolvedCheck>>();

  constructor(private readonly settings: CheckSettings) {
    this.categories = new Map(Object.entries(settings.categories ?? {}).map(([name, overrides]) => [normalise(name), overrides]));
  }

  resolve(check: Check, category: string | null | undefined, seriesId: string | null): ResolvedCheck {
    const own = seriesId === null ? undefined : this.settings.series?.[seriesId]?.[check.id];
    const spelled = category || '';
    let resolved = this.byCategory.get(spelled);
    if (!resolved) this.byCategory.set(spelled, (resolved = new Map()));
    let base = resolved.get(check.id);
    if (!base) resolved.set(check.id, (base = this.base(check, category)));
    return merge(base, own);
  }

  /** The check's settings for the category (defaults, then the run's, then the category's). */
  private base(check: Check, category: string | null | undefined): ResolvedCheck {
    const categoryKey = category ? normalise(category) : '';
    const memoKey = `${check.id}\u0000${categoryKey}`;
    let base = this.memo.get(memoKey);
    if (!base) {
      base = merge(merge({ enabled: true, params: check.defaults as CheckParams }, this.settings.run?.[check.id]), this.categories.get(categoryKey)?.[check.id]);
      this.memo.set(memoKey, base);
    }
    return base;
  }
}

function merge(base: ResolvedCheck, override: CheckOverride | undefined): ResolvedCheck {
  if (!override) return base;
  const { enabled, ...params } = override;
  const defined = Object.fromEntries(Object.entries(params).filter(([, v]) => v !== undefined)) as CheckParams;
  return { enabled: enabled ?? base.enabled, params: { ...base.params, ...defined } };
}

function normalise(category: string): string {
  return category.trim().toLowerCase();
}
