export {
  findSnapshot,
  listFeeds,
  listSnapshots,
  previousSnapshot,
  readManifest,
  readSnapshot,
  writeSnapshot,
  type LoadedSnapshot,
  type SnapshotInput,
  type SnapshotRef,
  type SnapshotSource,
  type WriteOptions,
  type WriteStep,
} from './snapshot-store.js';
export { MANIFEST_FILE, REJECTED_FILE, type SnapshotFile, type SnapshotManifest } from './manifest.js';
export { sha256File } from './durable-files.js';
