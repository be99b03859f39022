import { join } from 'node:path';
import { DataType, DateUnit, tableFromIPC, type Data, type Table } from 'apache-arrow';
import { arrowToCanonical } from '../ingest/arrow-table.js';
import { toSeriesFrame } from '../ingest/convert.js';
import { buildSeriesFrame, datedFrameOf, type DatedFrame, type SeriesFrame } from '../series/frame.js';
import type { SnapshotFile } from './manifest.js';
import { readNavFrameInPart } from './stored-nav-frame.js';
import { latestEarlierThatLoads, type UnreadableSnapshot } from './snapshot-catalog.js';
import { readStoredArrow } from './stored-files.js';

/**
 * The previous business day's NAVs, which today's feed is compared with (restated history):
 * the NAV table of the latest earlier snapshot whose NAV table reads. Only that table is read;
 * a snapshot whose manifest or NAV table is damaged is passed over and returned with its reason.
 *
 * Today's feed is compared with it by date and value, so its frame keeps no lines. The frame's
 * columns are on shared memory, so the check workers read them without a copy. In the common
 * case (the form `run` stores: no missing value, ids in ascending order) only the dates and
 * values are read from the file, each at its place: at 10,000 series 300 MB of the 500 MB file,
 * whose series codes (100 MB) the frame does not need once its runs are found.
 * Any other table is read whole into shared memory and framed as views of its bytes (one
 * record batch, no missing value) or decoded as any Arrow table.
 */
export interface PreviousNav {
  readonly asOf?: string;
  readonly nav?: DatedFrame;
  readonly skipped: UnreadableSnapshot[];
}

export function previousNav(storeDir: string, feed: string, asOfExclusive: string): PreviousNav {
  const { snapshot, loaded, skipped } = latestEarlierThatLoads(storeDir, feed, asOfExclusive, ({ dir, manifest }) => {
    const file = manifest.files.find((entry) => entry.kind === 'nav');
    return file && readStoredNavFrame(dir, file);
  });
  return snapshot ? { asOf: snapshot.asOf, nav: loaded, skipped } : { skipped };
}

/**
 * A stored NAV table as a series frame, checked against the SHA-256 of its manifest: read in part
 * when it is in the form `run` stores (src/store/stored-nav-frame.ts), else read whole.
 */
export function readStoredNavFrame(dir: string, file: SnapshotFile): DatedFrame {
  return readNavFrameInPart(join(dir, file.stored_file), file.stored_sha256) ?? datedFrameOf(readWholeNavFrame(dir, file));
}

/** The whole file in shared memory, framed as views of its bytes when it can be, else decoded. */
export function readWholeNavFrame(dir: string, file: SnapshotFile): SeriesFrame {
  return readStoredArrow(
    dir,
    file,
    (bytes, path) => {
      const table = tableFromIPC(bytes);
      return frameOfViews(table) ?? toSeriesFrame(arrowToCanonical('nav', table, path), 'nav');
    },
    true,
  );
}

/**
 * The frame whose columns are views of the stored table's own buffers, or null when the table
 * is not in the form navassay stores a complete NAV table in (then it is decoded as any Arrow
 * table is). The frame is the decoded one's, value for value (test/store/previous-nav.test.ts).
 */
function frameOfViews(table: Table): SeriesFrame | null {
  if (table.batches.length !== 1) return null;
  const ids = onlyChunk(table, 'series_id');
  const dates = onlyChunk(table, 'date');
  const values = onlyChunk(table, 'nav');
  const lines = onlyChunk(table, 'line');
  if (!ids || !dates || !values || !lines) return null;
  if (!DataType.isDictionary(ids.type) || !(DataType.isDate(dates.type) && dates.type.unit === DateUnit.DAY) || !DataType.isFloat(values.type) || !DataType.isInt(lines.type)) return null;
  const codes = ids.values;
  if (!(codes instanceof Int32Array) || !(dates.values instanceof Int32Array) || !(values.values instanceof Float64Array) || !(lines.values instanceof Int32Array)) return null;
  const dictionary = ids.dictionary?.toArray() as unknown[] | undefined;
  if (!dictionary || !dictionary.every((entry) => typeof entry === 'string') || new Set(dictionary).size !== dictionary.length) return null;
  const length = table.numRows;
  return buildSeriesFrame({
    codes: codes.subarray(0, length),
    dictionary: dictionary as string[],
    dates: dates.values.subarray(0, length),
    values: values.values.subarray(0, length),
    lines: lines.values.subarray(0, length),
  });
}

/** The one chunk of a column without a missing value, or null. */
function onlyChunk(table: Table, name: string): Data | null {
  const column = table.getChild(name);
  if (!column || column.data.length !== 1) return null;
  const data = column.data[0];
  return data.nullCount === 0 && data.offset === 0 ? data : null;
}
