import { z } from 'zod';
import { FILE_KINDS } from '../ingest/schema.js';

/** `manifest.json`: what one snapshot holds and where each stored file came from. */
export const MANIFEST_FILE = 'manifest.json';
export const REJECTED_FILE = 'rejected.csv';
export const MANIFEST_FORMAT = 'navassay-snapshot';

const rowCounts = z.object({
  read: z.number().int().nonnegative(),
  accepted: z.number().int().nonnegative(),
  rejected: z.number().int().nonnegative(),
});

export const SnapshotFileSchema = z.object({
  kind: z.enum(FILE_KINDS),
  /** The input file as the run named it. */
  source_path: z.string(),
  /** SHA-256 (hex) of the input file's bytes. */
  source_sha256: z.string().regex(/^[0-9a-f]{64}$/),
  rows: rowCounts,
  /** The canonical table in this snapshot's directory, an Arrow IPC file. */
  stored_file: z.string().regex(/^[a-z]+\.arrow$/, 'must be <kind>.arrow inside the snapshot directory'),
  /** SHA-256 (hex) of the stored file, checked when the snapshot is read. */
  stored_sha256: z.string().regex(/^[0-9a-f]{64}$/),
});

export const SnapshotManifestSchema = z.object({
  format: z.literal(MANIFEST_FORMAT),
  version: z.literal(1),
  feed: z.string(),
  /** ISO date the snapshot stands for. */
  as_of: z.string().regex(/^\d{4}-\d{2}-\d{2}$/),
  /** ISO timestamp (UTC) of the write. */
  created_at: z.string(),
  files: z.array(SnapshotFileSchema),
  /** The quarantine: every rejected row of the day's files. */
  rejected_file: z.literal(REJECTED_FILE),
  rejected_rows: z.number().int().nonnegative(),
});

export type SnapshotFile = z.infer<typeof SnapshotFileSchema>;
export type SnapshotManifest = z.infer<typeof SnapshotManifestSchema>;
