import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it, vi } from 'vitest';
import { writeDemo } from '../../src/cli/commands/demo.js';
import { parseIsoDate } from '../../src/calendar/days.js';
import { loadRunConfig } from '../../src/config/run-config.js';
import { ConfigError } from '../../src/ingest/errors.js';
import { runDailyJob } from '../../src/job/daily-job.js';
import { scratchDir } from '../cli/run-cli.js';

// The snapshot's writer thread, replaced by one that fails as a full disk does (the sentence of
// src/store/snapshot-store.ts), and only after the reports have had time to be written.
const FULL_DISK = 'Cannot write the snapshot into the store STORE (ENOSPC: no space left on device); free space, fix the permissions or point store elsewhere, then run again.';
vi.mock('../../src/store/background-write.js', () => ({
  writeSnapshotInBackground: () => new Promise((_, reject) => setTimeout(() => reject(new ConfigError(FULL_DISK)), 50)),
}));

describe('the snapshot written beside the reports', () => {
  it('a snapshot that cannot be written fails the run with the store sentence, after the day’s reports are on the disk', async () => {
    const dir = scratchDir();
    const config = loadRunConfig(writeDemo(dir).at(-1)!);
    const failure = await runDailyJob(config, parseIsoDate('2026-11-30')!).catch((error: unknown) => error);
    expect(failure).toBeInstanceOf(ConfigError);
    expect((failure as Error).message).toBe(FULL_DISK);
    // The reports were written while the snapshot was: the day's report is readable JSON.
    const report = join(config.output.dir, 'report.json');
    expect(existsSync(report)).toBe(true);
    expect(JSON.parse(readFileSync(report, 'utf8'))).toHaveProperty('summary');
  });
});
