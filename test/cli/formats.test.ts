import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { demoFiles } from '../../src/demo/scenario.js';
import { writeArrowIpc } from '../../src/ingest/arrow-table.js';
import { readCsvFile } from '../../src/ingest/csv-source.js';
import { DEFAULT_PROFILE, FeedProfileSchema } from '../../src/ingest/profile.js';
import { writeParquet } from '../../fixtures/parquet-writer.js';
import { runCli, scratchDir, writeFiles } from './run-cli.js';

/**
 * The same day's data given as CSV, Arrow IPC and Parquet must give the same answers, evidence
 * lines included (Arrow and Parquet records are numbered as the lines of the same CSV).
 */
describe('CSV, Arrow IPC and Parquet inputs give identical answers', () => {
  it('for check and for metrics', async () => {
    const dir = scratchDir();
    writeFiles(dir, demoFiles());
    const nav = readCsvFile(join(dir, 'nav.csv'), 'nav', DEFAULT_PROFILE);
    expect(nav.rows.rejected).toBeGreaterThan(0);
    const rejectedLines = new Set(nav.rejected.map((row) => row.line));
    const cleanCsv = readFileSync(join(dir, 'nav.csv'), 'utf8')
      .split('\n')
      .filter((_, index) => !rejectedLines.has(index + 1))
      .join('\n');
    writeFileSync(join(dir, 'clean.csv'), cleanCsv);
    const clean = readCsvFile(join(dir, 'clean.csv'), 'nav', DEFAULT_PROFILE);
    expect(clean.rows).toEqual({ read: nav.rows.accepted, accepted: nav.rows.accepted, rejected: 0 });
    writeArrowIpc(clean.table, join(dir, 'clean.arrow'));
    writeParquet(clean.table, join(dir, 'clean.parquet'));
    const indexVendor = FeedProfileSchema.parse({
      columns: { benchmark_id: 'Index Code', date: 'Value Date', level: 'Close' },
      delimiter: ';',
      decimal: ',',
      date_format: 'day-first',
    });
    writeArrowIpc(readCsvFile(join(dir, 'benchmarks.csv'), 'benchmarks', indexVendor).table, join(dir, 'benchmarks.arrow'));

    const answers = async (navFile: string) => {
      const common = ['--benchmarks', join(dir, 'benchmarks.arrow'), '--master', join(dir, 'master.csv'), '--format', 'json'];
      const check = await runCli('check', '--nav', join(dir, navFile), ...common, '--holidays', join(dir, 'holidays.csv'), '--actions', join(dir, 'actions.csv'), '--previous', join(dir, 'nav-previous.csv'), '--as-of', '2026-11-30');
      const metrics = await runCli('metrics', '--nav', join(dir, navFile), ...common, '--rates', join(dir, 'rates.csv'), '--as-of', '2026-11-30');
      expect(metrics.status, metrics.stderr).toBe(0);
      return { check: JSON.parse(check.stdout), metrics: JSON.parse(metrics.stdout) };
    };
    const csv = await answers('clean.csv');
    expect(csv.check.findings.length).toBeGreaterThan(10);
    expect(csv.metrics.metrics.some((figure: { value: number | null }) => figure.value !== null)).toBe(true);
    expect(await answers('clean.arrow')).toEqual(csv);
    expect(await answers('clean.parquet')).toEqual(csv);
  });
});
