import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { demoConfig, demoFiles } from '../../src/demo/scenario.js';
import type { ReconcileAnswer } from '../../src/reconcile/reconcile.js';
import { runCli, scratchDir, writeFiles } from './run-cli.js';

/** The demo's vendor file holds each kind of difference (src/demo/vendor-figures.ts says which). */
function demoDir(): string {
  const dir = scratchDir();
  writeFiles(dir, { ...demoFiles(), 'navassay.yaml': demoConfig() });
  return dir;
}

function reconcileArgs(dir: string, ...more: string[]): string[] {
  const at = (name: string) => join(dir, name);
  return [
    'reconcile', '--nav', at('nav.csv'), '--benchmarks', at('benchmarks.csv'), '--master', at('master.csv'), '--vendor', at('vendor-figures.csv'),
    '--rates', at('rates.csv'), '--actions', at('actions.csv'), '--config', at('navassay.yaml'), ...more,
  ];
}

describe('navassay reconcile on the demo feed', () => {
  const dir = demoDir();

  it('answers the interface JSON with every status, and exits 1 on a breach', async () => {
    const { status, stdout } = await runCli(...reconcileArgs(dir, '--format', 'json'));
    expect(status).toBe(1);
    const answer = JSON.parse(stdout) as ReconcileAnswer;
    expect(new Set(answer.results.map((r) => r.status))).toEqual(new Set(['match', 'rounding', 'breach', 'not_computable']));
    const find = (series: string, window: string, metric: string) => answer.results.find((r) => r.series_id === series && r.window === window && r.metric === metric)!;
    // NVA0001's standard deviations use the population denominator.
    expect(find('NVA0001', '3y', 'std_dev')).toMatchObject({ status: 'breach', explanations: [{ kind: 'convention', changes: { sd_denominator: 'population' } }] });
    // NVA0003's R² is a percentage labelled decimal.
    expect(find('NVA0003', '1y', 'r_squared').explanations[0]).toMatchObject({ changes: { scale: 'percent' } });
    // NVA0007's Treynor ratio has the wrong sign: nothing reproduces it.
    expect(find('NVA0007', '1y', 'treynor')).toMatchObject({ status: 'breach', explanations: [] });
    // NVA0002's figures in percent are honest.
    expect(answer.results.filter((r) => r.series_id === 'NVA0002').every((r) => r.status === 'match' || r.status === 'rounding')).toBe(true);
    expect(find('NVA0003', '10y', 'std_dev')).toMatchObject({ status: 'not_computable', unsupported_by_data: true });
    for (const result of answer.results) {
      expect(Object.keys(result)).toEqual(expect.arrayContaining(['series_id', 'as_of', 'window', 'metric', 'vendor', 'computed', 'difference', 'tolerance', 'status', 'explanations']));
    }
    expect(answer.summary.vendor_patterns.map((p) => p.sentence)).toContain(
      "This vendor's std_dev figures are reproduced with sd_denominator population: 2 of 2 breaches explained.",
    );
  });

  it('exits 0 with --fail-on none, and renders every format with the caution', async () => {
    for (const format of ['table', 'csv', 'markdown', 'html']) {
      const { status, stdout } = await runCli(...reconcileArgs(dir, '--format', format, '--fail-on', 'none'));
      expect(status).toBe(0);
      expect(stdout).toContain('NVA0001');
      if (format !== 'csv') expect(stdout).toContain('no guarantee of future results');
    }
  });

  it('takes a tolerances file, and refuses a bad one with its line', async () => {
    writeFiles(dir, { 'wide.yaml': 'run:\n  treynor: { absolute: 1 }\n', 'bad.yaml': 'run:\n  treynr: { absolute: 1 }\n' });
    const wide = JSON.parse((await runCli(...reconcileArgs(dir, '--format', 'json', '--tolerances', join(dir, 'wide.yaml')))).stdout) as ReconcileAnswer;
    expect(wide.results.filter((r) => r.metric === 'treynor').every((r) => r.status === 'match')).toBe(true);
    const bad = await runCli(...reconcileArgs(dir, '--format', 'json', '--tolerances', join(dir, 'bad.yaml')));
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/bad\.yaml, line 2: .*treynr/);
  });

  it('--as-of keeps the figures of that day only', async () => {
    const answer = JSON.parse((await runCli(...reconcileArgs(dir, '--format', 'json', '--as-of', '2026-10-30'))).stdout) as ReconcileAnswer;
    expect(answer.results).toEqual([]);
    expect(answer.summary.skipped).toBeGreaterThan(0);
  });
});

describe('navassay run reconciles when the configuration names a vendor file', () => {
  it('writes reconcile reports beside the others', async () => {
    const dir = demoDir();
    const { status } = await runCli('run', join(dir, 'navassay.yaml'), '--format', 'json');
    expect(status).toBe(0); // the demo configuration says fail_on: none
    const report = join(dir, 'report', 'reconcile.json');
    expect(existsSync(report)).toBe(true);
    const answer = JSON.parse(readFileSync(report, 'utf8')) as ReconcileAnswer;
    expect(answer.summary.by_status.breach).toBeGreaterThan(0);
    const metrics = JSON.parse(readFileSync(join(dir, 'report', 'metrics.json'), 'utf8')) as { metrics: Array<{ series_id: string; suspect_data?: string[] }> };
    expect(metrics.metrics.some((row) => row.suspect_data?.some((key) => key.startsWith('spike_reversal|NVA0010')))).toBe(true);
  });
});
