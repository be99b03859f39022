export {
  findSnapshot,
  listFeeds,
  listSnapshots,
  previousReadableSnapshot,
  previousSnapshot,
  scanSnapshots,
  readManifest,
  readSnapshot,
  writeSnapshot,
  type LoadedSnapshot,
  type SnapshotInput,
  type SnapshotRef,
  type SnapshotSource,
  type UnreadableSnapshot,
  type WriteOptions,
  type WriteStep,
} from './snapshot-store.js';
export { MANIFEST_FILE, REJECTED_FILE, type SnapshotFile, type SnapshotManifest } from './manifest.js';
export { sha256File } from './durable-files.js';
