import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, scratchDir, writeFiles } from './run-cli.js';

const NAV = ['series_id,date,nav', 'NVA0001,2026-11-23,100', 'NVA0001,2026-11-24,101', 'NVA0001,2026-11-25,102', ''].join('\n');

describe('every command answers --help and --version', () => {
  for (const command of ['demo', 'run', 'check', 'metrics', 'reconcile', 'ingest']) {
    it(`${command} --help prints its usage and exits 0`, async () => {
      const { status, stdout } = await runCli(command, '--help');
      expect(status).toBe(0);
      expect(stdout).toContain(`Usage: navassay ${command}`);
    });
    it(`${command} --version prints the package version`, async () => {
      const { status, stdout } = await runCli(command, '--version');
      const { version } = JSON.parse(readFileSync('package.json', 'utf8')) as { version: string };
      expect(status).toBe(0);
      expect(stdout.trim()).toBe(version);
    });
  }
});

describe('exit statuses of docs/interface.md', () => {
  it('0 when nothing reaches --fail-on, 1 when something does', async () => {
    const dir = scratchDir();
    writeFiles(dir, { 'nav.csv': NAV });
    const clean = await runCli('check', '--nav', join(dir, 'nav.csv'), '--as-of', '2026-11-25', '--format', 'json');
    expect(clean.status).toBe(0);
    expect(JSON.parse(clean.stdout).findings).toEqual([]);
    writeFiles(dir, { 'bad.csv': NAV + 'NVA0001,2026-11-26,-5\n' });
    const bad = await runCli('check', '--nav', join(dir, 'bad.csv'), '--as-of', '2026-11-26', '--format', 'json');
    expect(bad.status).toBe(1);
    const tolerant = await runCli('check', '--nav', join(dir, 'bad.csv'), '--as-of', '2026-11-26', '--format', 'json', '--fail-on', 'none');
    expect(tolerant.status).toBe(0);
  });

  it('2 for a wrong command line, with the reason on standard error', async () => {
    expect((await runCli('check')).status).toBe(2);
    expect((await runCli('no-such-command')).status).toBe(2);
    const badFormat = await runCli('check', '--nav', 'x.csv', '--format', 'pdf');
    expect(badFormat.status).toBe(2);
    expect(badFormat.stderr).toContain('pdf');
    const badDate = await runCli('check', '--nav', 'x.csv', '--as-of', '30/11/2026');
    expect(badDate.status).toBe(2);
    expect(badDate.stderr).toMatch(/--as-of "30\/11\/2026" is not a date; write it as YYYY-MM-DD/);
    const badThreads = await runCli('run', 'navassay.yaml', '--threads', '0');
    expect(badThreads.status).toBe(2);
    expect(badThreads.stderr).toContain('--threads "0" is not a whole number from 1 to 64');
  });

  it('3 for a file that cannot be opened or has no usable header, in one sentence naming the file', async () => {
    const dir = scratchDir();
    const missing = await runCli('check', '--nav', join(dir, 'absent.csv'), '--as-of', '2026-11-25');
    expect(missing.status).toBe(3);
    expect(missing.stderr).toContain(join(dir, 'absent.csv'));
    writeFiles(dir, { 'empty.csv': '', 'wrong.csv': 'fund,day,price\nA,2026-11-25,1\n' });
    const empty = await runCli('check', '--nav', join(dir, 'empty.csv'), '--as-of', '2026-11-25');
    expect(empty.status).toBe(3);
    expect(empty.stderr).toMatch(/empty\.csv, line 1: .*; .*\.\n$/);
    const wrong = await runCli('check', '--nav', join(dir, 'wrong.csv'), '--as-of', '2026-11-25');
    expect(wrong.status).toBe(3);
    expect(wrong.stderr).toContain('wrong.csv, line 1: the header has no column "series_id" (found: fund, day, price)');
  });
});

describe('check', () => {
  it('accounts for every row and quarantines the rejected ones beside the report', async () => {
    const dir = scratchDir();
    writeFiles(dir, { 'nav.csv': NAV + 'NVA0001,2026-11-2X,103\nNVA0001,2026-11-26\n' });
    const out = join(dir, 'report.json');
    const { status } = await runCli('check', '--nav', join(dir, 'nav.csv'), '--as-of', '2026-11-26', '--format', 'json', '--out', out);
    expect(status).toBe(1);
    const answer = JSON.parse(readFileSync(out, 'utf8'));
    expect(answer.rows).toEqual({ read: 5, accepted: 3, rejected: 2 });
    expect(answer.as_of).toBe('2026-11-26');
    const unparseable = answer.findings.filter((f: { check: string }) => f.check === 'unparseable_row');
    expect(unparseable).toHaveLength(2);
    expect(answer.summary.by_check.unparseable_row).toBe(2);
    const quarantine = readFileSync(join(dir, 'report.quarantine.csv'), 'utf8').trim().split('\n');
    expect(quarantine[0]).toBe('file,line,raw,reason'); // the same form as a snapshot's rejected.csv
    expect(quarantine).toHaveLength(3);
    expect(quarantine[1]).toContain(',5,');
    expect(quarantine[2]).toContain(',6,');
  });

  it('writes every format, each carrying the findings', async () => {
    const dir = scratchDir();
    writeFiles(dir, { 'nav.csv': NAV + 'NVA0001,2026-11-26,0\n' });
    for (const format of ['table', 'csv', 'markdown', 'html']) {
      const { stdout } = await runCli('check', '--nav', join(dir, 'nav.csv'), '--as-of', '2026-11-26', '--format', format);
      expect(stdout, format).toContain('non_positive_value');
      expect(stdout, format).toContain('NVA0001');
    }
    const csv = (await runCli('check', '--nav', join(dir, 'nav.csv'), '--as-of', '2026-11-26', '--format', 'csv')).stdout.trim().split('\n');
    expect(csv[0]).toBe('check,severity,series_id,start,end,message,key,evidence');
    expect(csv[1]).toMatch(/^non_positive_value,critical,NVA0001,2026-11-26,2026-11-26,.*,non_positive_value\|NVA0001\|2026-11-26,"\{/);
    const html = (await runCli('check', '--nav', join(dir, 'nav.csv'), '--as-of', '2026-11-26', '--format', 'html')).stdout;
    expect(html).toMatch(/^<!doctype html>/);
    expect(html).toContain('compliance function');
  });
});

describe('demo and run', () => {
  it('the demo writes its feed, runs the daily job, stores the snapshot and writes the reports', async () => {
    const dir = scratchDir();
    const { status, stdout } = await runCli('demo', '--dir', dir, '--format', 'json');
    expect(status).toBe(0);
    const answer = JSON.parse(stdout);
    expect(answer.rows.read).toBe(answer.rows.accepted + answer.rows.rejected);
    const found = new Set(answer.findings.map((f: { check: string; series_id: string }) => `${f.check} ${f.series_id}`));
    for (const planted of [
      'stale_value NVA0007',
      'split_like_jump NVA0009',
      'spike_reversal NVA0010',
      'missing_dates NVA0011',
      'late_series NVA0011',
      'date_shift NVA0012',
      'benchmark_mismatch NVA0004',
      'restated_value NVA0005',
      'dropped_rows NVA0001',
      'duplicate_row NVA0001',
      'duplicate_conflict NVA0002',
      'non_positive_value NVA0005',
      'future_date NVA0001',
      'off_calendar_date NVA0010',
      'vendor_inconsistent NVA0003', // R² written as a percentage, labelled decimal
      'vendor_inconsistent NVA0007', // Treynor with the wrong sign
      'vendor_inconsistent NVA0010', // beta delivered twice
    ]) {
      expect(found, planted).toContain(planted);
    }
    const split = answer.findings.find((f: { check: string; series_id: string }) => f.check === 'split_like_jump' && f.series_id === 'NVA0008');
    expect(split.severity).toBe('info');
    expect(answer.findings.some((f: { series_id: string; check: string }) => f.series_id === 'NVA0006' && f.check === 'stale_value')).toBe(false);
    for (const name of ['check.json', 'check.html', 'metrics.json', 'metrics.md', 'quarantine.csv']) {
      expect(existsSync(join(dir, 'report', name)), name).toBe(true);
    }
    expect(existsSync(join(dir, 'store', 'bramblecourt-daily', '2026-11-30', 'manifest.json'))).toBe(true);
    const metrics = JSON.parse(readFileSync(join(dir, 'report', 'metrics.json'), 'utf8'));
    // NVA0008's announced 10-for-1 split must not read as a 90 % loss: NAVs are adjusted first.
    const splitFund = metrics.metrics.find((f: { series_id: string; window: string; metric: string }) => f.series_id === 'NVA0008' && f.window === '1y' && f.metric === 'max_drawdown');
    expect(splitFund.value).toBeLessThan(0.5);
    for (const figure of metrics.metrics) {
      if (figure.value === null) expect(figure.reason, JSON.stringify(figure)).toBeTruthy();
      else expect(Number.isFinite(figure.value)).toBe(true);
    }
  });

  it('a configuration mistake names the file, the line and the key path, and exits 2', async () => {
    const dir = scratchDir();
    writeFiles(dir, {
      'bad.yaml': ['feed: demo', 'files:', '  nav: nav.csv', 'windows: [1y, 3 years]', ''].join('\n'),
      'typo.yaml': ['feed: demo', 'files:', '  nav: nav.csv', 'output:', '  formats: [json]', '  folder: out', ''].join('\n'),
      'profile.yaml': ['files:', '  nav: { path: nav.csv, profile: vendor-x }', ''].join('\n'),
    });
    const bad = await runCli('run', join(dir, 'bad.yaml'));
    expect(bad.status).toBe(2);
    expect(bad.stderr).toContain('bad.yaml, line 4: windows.1: must be a window such as 1y, 3y or 6m');
    const typo = await runCli('run', join(dir, 'typo.yaml'));
    expect(typo.status).toBe(2);
    expect(typo.stderr).toContain('typo.yaml, line 6: output: unknown key "folder" (allowed: dir, formats)');
    const profile = await runCli('run', join(dir, 'profile.yaml'));
    expect(profile.status).toBe(2);
    expect(profile.stderr).toContain('profile.yaml, line 2: files.nav.profile names "vendor-x", which is not under profiles');
  });
});

describe('metrics', () => {
  it('reads vendor layouts through --config, takes methodology changes from --set, and explains a bad one', async () => {
    const dir = scratchDir();
    await runCli('demo', '--dir', dir, '--format', 'json');
    const args = ['metrics', '--config', join(dir, 'navassay.yaml'), '--nav', join(dir, 'nav.csv'), '--benchmarks', join(dir, 'benchmarks.csv'), '--master', join(dir, 'master.csv'), '--rates', join(dir, 'rates.csv'), '--as-of', '2026-11-30', '--windows', '3y', '--format', 'json'];
    const figure = (answer: { metrics: Array<{ series_id: string; metric: string; value: number }> }, metric: string) =>
      answer.metrics.find((f) => f.series_id === 'NVA0001' && f.metric === metric)!.value;
    const sample = JSON.parse((await runCli(...args)).stdout);
    const population = JSON.parse((await runCli(...args, '--set', 'sd_denominator=population')).stdout);
    expect(population.methodology.sd_denominator).toBe('population');
    // Definition: population SD = sample SD × √((n − 1) / n), n = 36 monthly returns.
    expect(figure(population, 'std_dev')).toBeCloseTo(figure(sample, 'std_dev') * Math.sqrt(35 / 36), 12);
    // Beta is a ratio of covariance to variance: the denominator cancels.
    expect(figure(population, 'beta')).toBeCloseTo(figure(sample, 'beta'), 12);
    const bad = await runCli(...args, '--set', 'mar=half');
    expect(bad.status).toBe(2);
    expect(bad.stderr).toContain('--set mar: must be risk_free, zero or an annual rate such as 0.02.');
    // A fixed annual MAR and per-period ratios (docs/methodology.md): the per-period Sortino
    // about 0.02 / 12 a month, annualised by √12, is the annualised one.
    const fixed = JSON.parse((await runCli(...args, '--set', 'mar=0.02', '--set', 'ratio_scale=per_period')).stdout);
    expect(fixed.methodology).toMatchObject({ mar: 0.02, ratio_scale: 'per_period' });
    const fixedAnnualized = JSON.parse((await runCli(...args, '--set', 'mar=0.02')).stdout);
    expect(figure(fixed, 'sortino') * Math.sqrt(12)).toBeCloseTo(figure(fixedAnnualized, 'sortino'), 12);
    expect(figure(fixedAnnualized, 'sortino')).not.toBeCloseTo(figure(sample, 'sortino'), 6);
  });
});
