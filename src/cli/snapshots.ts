import type { RunConfig } from '../config/run-config.js';
import type { LoadedFeed } from '../ingest/feed.js';
import type { SeriesFrame } from '../series/frame.js';

/** The run's bridge to the snapshot store: find yesterday's NAVs, keep today's. */
export async function previousNavFromStore(_config: RunConfig, _asOf: number): Promise<SeriesFrame | undefined> {
  return undefined;
}

export function storeSnapshot(_config: RunConfig, _asOf: number, _feed: LoadedFeed): void {}
