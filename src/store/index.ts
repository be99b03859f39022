export {
  findSnapshot,
  listFeeds,
  listSnapshots,
  previousSnapshot,
  readManifest,
  scanSnapshots,
  type SnapshotRef,
  type UnreadableSnapshot,
} from './snapshot-catalog.js';
export {
  previousReadableSnapshot,
  readSnapshot,
  writeSnapshot,
  type LoadedSnapshot,
  type SnapshotInput,
  type SnapshotSource,
  type WriteOptions,
  type WriteStep,
} from './snapshot-store.js';
export { MANIFEST_FILE, REJECTED_FILE, type SnapshotFile, type SnapshotManifest } from './manifest.js';
export { sha256File } from './durable-files.js';
