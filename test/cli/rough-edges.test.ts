import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { checkFeed, computeFigures, ConfigError, loadFeed } from '../../src/index.js';
import { runCli, scratchDir, writeFiles } from './run-cli.js';

/** Each case is a defect a new user met; each test would have caught it. */

const NAV = ['series_id,date,nav', 'NVA0001,2026-11-23,100', 'NVA0001,2026-11-24,101', 'NVA0001,2026-11-25,102', ''].join('\n');

/** One sentence on standard error, starting `navassay:`, no stack trace. */
function expectOneSentence(stderr: string): void {
  expect(stderr).toMatch(/^navassay: [^\n]+\.\n$/);
  expect(stderr).not.toContain('internal error');
  expect(stderr).not.toMatch(/\n\s+at /);
}

describe('an unusable output or store location is a one-sentence error with exit 2', () => {
  it('demo --dir under a regular file', async () => {
    const dir = scratchDir();
    writeFiles(dir, { afile: 'not a directory\n' });
    const under = await runCli('demo', '--dir', join(dir, 'afile', 'sub'));
    expect(under.status).toBe(2);
    expectOneSentence(under.stderr);
    expect(under.stderr).toContain('lies under the file');
    const itself = await runCli('demo', '--dir', join(dir, 'afile'));
    expect(itself.status).toBe(2);
    expectOneSentence(itself.stderr);
    expect(itself.stderr).toContain('is a file');
  });

  it("run with output.dir or the store under a regular file, and --out naming a directory", async () => {
    const dir = scratchDir();
    writeFiles(dir, {
      'nav.csv': NAV,
      afile: 'x\n',
      'out.yaml': ['files:', '  nav: nav.csv', 'output:', '  dir: afile/report', ''].join('\n'),
      'store.yaml': ['files:', '  nav: nav.csv', 'store: afile', ''].join('\n'),
    });
    for (const config of ['out.yaml', 'store.yaml']) {
      const result = await runCli('run', join(dir, config), '--as-of', '2026-11-25');
      expect(result.status, config).toBe(2);
      expectOneSentence(result.stderr);
    }
    const out = await runCli('check', '--nav', join(dir, 'nav.csv'), '--as-of', '2026-11-25', '--out', dir);
    expect(out.status).toBe(2);
    expectOneSentence(out.stderr);
  });
});

describe('argument-parser errors read like every other error', () => {
  it('start with navassay: and say what to do', async () => {
    const missing = await runCli('check');
    expect(missing.status).toBe(2);
    expectOneSentence(missing.stderr);
    expect(missing.stderr).toContain("required option '--nav <file>' not specified; see navassay check --help");
    const unknown = await runCli('no-such-command');
    expect(unknown.status).toBe(2);
    expectOneSentence(unknown.stderr);
    expect(unknown.stderr).toContain('see navassay --help');
    const choice = await runCli('check', '--nav', 'x.csv', '--format', 'pdf');
    expectOneSentence(choice.stderr);
  });
});

describe('ingest', () => {
  it('--store wins over the configuration, as --as-of does', async () => {
    const dir = scratchDir();
    writeFiles(dir, { 'nav.csv': NAV, 'run.yaml': ['feed: f', 'store: configured-store', 'files:', '  nav: nav.csv', ''].join('\n') });
    const chosen = join(dir, 'chosen-store');
    const result = await runCli('ingest', '--config', join(dir, 'run.yaml'), '--store', chosen, '--as-of', '2026-11-25', '--format', 'json');
    expect(result.status).toBe(0);
    expect(existsSync(join(chosen, 'f', '2026-11-25', 'manifest.json'))).toBe(true);
    expect(existsSync(join(dir, 'configured-store'))).toBe(false);
  });
});

describe('allowed but probably unintended settings are said on standard error', () => {
  it('a checks.series entry for a series in no file', async () => {
    const dir = scratchDir();
    writeFiles(dir, {
      'nav.csv': NAV,
      'run.yaml': ['files:', '  nav: nav.csv', 'store: store', 'output: { dir: report }', 'checks:', '  series:', '    NVA0001: { stale_value: { min_days: 4 } }', '    NVA0O01: { stale_value: { min_days: 4 } }', ''].join('\n'),
    });
    const result = await runCli('run', join(dir, 'run.yaml'), '--as-of', '2026-11-25', '--format', 'json');
    expect(result.status).toBe(0);
    expect(result.stderr).toContain('navassay: warning: checks.series names "NVA0O01", which is in none of the day\'s files');
    expect(result.stderr).not.toContain('"NVA0001"');
  });

  it('an annualization other than the frequency\'s own (252 with monthly returns)', async () => {
    const dir = scratchDir();
    writeFiles(dir, {
      'nav.csv': NAV,
      'benchmarks.csv': 'benchmark_id,date,level\nB,2026-11-23,10\nB,2026-11-24,10.1\n',
      'master.csv': 'series_id,benchmark_id\nNVA0001,B\n',
    });
    const args = ['metrics', '--nav', join(dir, 'nav.csv'), '--benchmarks', join(dir, 'benchmarks.csv'), '--master', join(dir, 'master.csv'), '--as-of', '2026-11-30', '--format', 'json'];
    const unusual = await runCli(...args, '--set', 'annualization=252');
    expect(unusual.status).toBe(0);
    expect(unusual.stderr).toContain('navassay: note: annualization 252 with monthly returns (usually 12)');
    const usual = await runCli(...args, '--set', 'annualization=12');
    expect(usual.stderr).toBe('');
  });
});

describe('one rule for the format when standard output is not a terminal', () => {
  it('demo answers in JSON like run (the tests run with standard output on a pipe)', async () => {
    expect(process.stdout.isTTY).toBeFalsy();
    const dir = scratchDir();
    const demo = await runCli('demo', '--dir', dir);
    expect(() => JSON.parse(demo.stdout)).not.toThrow();
    const run = await runCli('run', join(dir, 'navassay.yaml'));
    expect(JSON.parse(run.stdout).as_of).toBe('2026-11-30');
  });

  it('npm test prints no colour codes when its output is not a terminal, tables printed by tests included', () => {
    const script = (JSON.parse(readFileSync('package.json', 'utf8')) as { scripts: { test: string } }).scripts.test;
    const vitest = script.slice(script.indexOf('&&') + 2).trim(); // the part after the type check
    // held-out.test.ts prints a score table with console.table, whose numbers were coloured.
    const result = spawnSync('sh', ['-c', `PATH="node_modules/.bin:$PATH"; ${vitest.replace(/vitest run/g, 'vitest run test/checks/held-out.test.ts')}`], {
      encoding: 'utf8',
      env: { ...process.env, FORCE_COLOR: undefined, CI: undefined, NO_COLOR: undefined },
    });
    expect(result.status).toBe(0);
    expect(result.stdout).toContain('held-out.test.ts');
    expect(result.stdout).toContain('│');
    expect(result.stdout + result.stderr).not.toContain('\u001b[');
  });
});

describe('the library takes dates, not day numbers', () => {
  it('accepts YYYY-MM-DD or a Date and refuses anything else', async () => {
    const dir = scratchDir();
    writeFiles(dir, { 'nav.csv': NAV + 'NVA0001,2026-11-26,-5\n' });
    const feed = await loadFeed({ nav: join(dir, 'nav.csv') });
    const byText = checkFeed(feed, { asOf: '2026-11-26' });
    expect(byText.as_of).toBe('2026-11-26');
    expect(byText.findings.map((f) => f.check)).toContain('non_positive_value');
    expect(checkFeed(feed, { asOf: new Date('2026-11-26') })).toEqual(byText);
    for (const wrong of [20_783, '26/11/2026', '2026-02-30', new Date('not a date')]) {
      expect(() => checkFeed(feed, { asOf: wrong as string })).toThrow(ConfigError);
    }
    expect(() => computeFigures(feed, { asOf: '2026-11-30' })).toThrow(/benchmarks and master/);
  });
});
