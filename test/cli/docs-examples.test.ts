import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadRunConfig } from '../../src/config/run-config.js';
import { scratchDir, writeFiles } from './run-cli.js';

/** The YAML fragments documented in docs/configuration.md must be a valid configuration together. */
describe('docs/configuration.md', () => {
  it('its YAML examples validate as one run configuration', () => {
    const text = readFileSync('docs/configuration.md', 'utf8');
    const fragments = [...text.matchAll(/```yaml\n([\s\S]*?)```/g)].map((match) => match[1]);
    expect(fragments.length).toBe(4);
    const dir = scratchDir();
    writeFiles(dir, { 'run.yaml': ['files:', '  nav: nav.csv', ...fragments].join('\n') });
    const config = loadRunConfig(join(dir, 'run.yaml'));
    expect(config.profiles).toEqual({});
    expect(config.checks.series?.NVA0011?.late_series).toEqual({ max_lag_business_days: 2 });
    expect(config.methodology.frequency).toBe('monthly');
    expect(config.reconcile.tolerances.series?.NVA0001?.sharpe).toEqual({ relative: 0.01 });
    expect(config.reconcile.tolerances.categories?.['money market']?.std_dev).toEqual({ absolute: 0.00002 });
  });
});
