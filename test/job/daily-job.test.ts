import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import { writeDemo } from '../../src/cli/commands/demo.js';
import { parseIsoDate } from '../../src/calendar/days.js';
import { loadRunConfig } from '../../src/config/run-config.js';
import { computeFigures, loadFeed, runDay } from '../../src/index.js';
import { runDailyJob } from '../../src/job/daily-job.js';
import { readManifest } from '../../src/store/index.js';
import { scratchDir } from '../cli/run-cli.js';

const sha256 = (bytes: Buffer) => createHash('sha256').update(bytes).digest('hex');

describe('the daily job', () => {
  const dir = scratchDir();
  const configPath = writeDemo(dir).at(-1)!;

  it("records each source's SHA-256 from the bytes it parsed, and the snapshot's manifest carries it", async () => {
    const run = await runDay(configPath, { asOf: '2026-11-30' });
    const manifest = readManifest(run.snapshot.dir);
    expect(run.day.feed.sources.map((source) => source.kind)).toEqual(manifest.files.map((file) => file.kind));
    for (const source of run.day.feed.sources) {
      // Hashed here with node:crypto straight from the file on disk, which has not changed since.
      expect(source.sha256, source.path).toBe(sha256(readFileSync(source.path)));
      expect(manifest.files.find((file) => file.kind === source.kind)!.source_sha256).toBe(source.sha256);
    }
  });

  it('reconciles every vendor figure, and raises tickets from the findings and the breaches', async () => {
    const stages: string[] = [];
    const config = loadRunConfig(configPath);
    const run = await runDailyJob(config, parseIsoDate('2026-11-30')!, (text) => stages.push(text.split(' ')[0]));
    // The risk figures are computed while the checks run, so "checking" tells both.
    expect(stages).toEqual(['reading', 'checking', 'reconciling', 'carrying', 'writing']);
    // The demo configuration names a vendor file: each of its figures gets exactly one result.
    expect(run.reconciliation!.results).toHaveLength(run.day.feed.vendor!.length);
    const breaches = new Set(run.reconciliation!.results.filter((result) => result.status === 'breach').map((result) => result.series_id));
    const breachTickets = run.tickets.records.filter((record) => record.check === 'reconcile_breach');
    expect(new Set(breachTickets.flatMap((record) => record.series_ids))).toEqual(breaches);
    // One vendor-level ticket per shared cause the reconciliation found.
    expect(run.tickets.records.filter((record) => record.check === 'vendor_explanation')).toHaveLength(run.reconciliation!.summary.vendor_patterns.length);
    expect(run.report.reconciliation!.results).toHaveLength(run.reconciliation!.results.length);
  });

  it('gives library callers of the risk figures NAVs adjusted for corporate actions, as the commands', async () => {
    // The demo's NVA0008 has an announced 10-for-1 split in the year (actions.csv); unadjusted,
    // it would read as a 90 % fall (a split changes units, not value: common practice to back-adjust).
    const paths = { nav: join(dir, 'nav.csv'), master: join(dir, 'master.csv'), benchmarks: join(dir, 'benchmarks.csv'), actions: join(dir, 'actions.csv') };
    const config = loadRunConfig(configPath);
    const feed = await loadFeed(paths, { profiles: config.profiles });
    const drawdown = computeFigures(feed, { asOf: '2026-11-30', windows: ['1y'] }).metrics.find((row) => row.series_id === 'NVA0008' && row.metric === 'max_drawdown')!;
    expect(drawdown.value).toBeLessThan(0.5);
  });

  it("runs the README's whole-day example as written", () => {
    const readme = readFileSync('README.md', 'utf8');
    const example = /```js\n(import \{ runDay \} from 'navassay';[\s\S]*?)```/.exec(readme)![1];
    const entry = pathToFileURL(join(process.cwd(), 'src', 'index.ts')).href;
    writeFileSync(join(dir, 'day.mjs'), example.replace("from 'navassay'", `from '${entry}'`));
    const tsx = pathToFileURL(join(process.cwd(), 'node_modules', 'tsx', 'dist', 'loader.mjs')).href; // the entry is TypeScript source here
    const result = spawnSync(process.execPath, ['--import', tsx, 'day.mjs'], { cwd: dir, encoding: 'utf8' });
    expect(result.stderr).toBe('');
    expect(result.status).toBe(0);
    expect(result.stdout).toMatch(/critical: 1/);
    expect(result.stdout).toMatch(/\d+ risk figures/);
    expect(result.stdout).toContain('bramblecourt-daily');
  });
});

describe('one window-label rule', () => {
  it('the command line, the run configuration and the vendor file accept and refuse the same labels', async () => {
    const { isWindowLabel } = await import('../../src/metrics/windows.js');
    const { RunConfigSchema } = await import('../../src/config/run-config.js');
    const { CANONICAL_COLUMNS } = await import('../../src/ingest/schema.js');
    const { parseWindowList } = await import('../../src/cli/commands/metrics.js');
    const vendorWindow = CANONICAL_COLUMNS.vendor.find((column) => column.name === 'window')!;
    // Decided in docs/decisions.md: `3Y` is a window (vendors write it); spaces, leading zeros and zero are not.
    const cases: Array<[string, boolean]> = [['1y', true], ['3Y', true], ['18m', true], ['6M', true], ['0y', false], ['03y', false], ['3 y', false], ['3w', false], ['y', false]];
    for (const [label, accepted] of cases) {
      expect(isWindowLabel(label), label).toBe(accepted);
      expect(RunConfigSchema.safeParse({ files: { nav: 'n.csv' }, windows: [label] }).success, `config ${label}`).toBe(accepted);
      expect(vendorWindow.validate?.(label) === null, `vendor ${label}`).toBe(accepted);
      if (accepted) expect(parseWindowList(label)).toEqual([label]);
      else expect(() => parseWindowList(label)).toThrow(/is not a list of windows/);
    }
  });
});
