import { parentPort, type MessagePort } from 'node:worker_threads';
import { describeThrown } from '../threads/thrown.js';
import type { CsvLayout, WindowArrays } from './csv-reader.js';
import type { ColumnsMemory } from './csv-stitch.js';
import { Prefaulter } from './prefault.js';
import { parseRingWindow, WindowRing, type ParsedWindow, type SharedRing } from './window-ring.js';

/**
 * The second parser of a CSV file read on two threads (csv-ring.ts). It starts while the main
 * thread reads the first window, receives the file's layout and the ring once the header is
 * read, then takes the next unparsed window whenever it is free and posts its rows on `port`
 * (which the main thread reads without returning to its event loop), until the ring stops.
 * When no window is waiting it takes the page faults of the file's columns ahead of the rows the
 * main thread has joined (prefault.ts), a step at a time.
 */
const PREFAULT_STEP_ROWS = 1 << 16;

parentPort!.once('message', (job: { layout: CsvLayout; ring: SharedRing; arrays: WindowArrays[]; columns: ColumnsMemory; port: MessagePort }) => {
  const ring = WindowRing.attach(job.ring);
  const prefaulter = new Prefaulter(job.columns.buffers, job.columns.rowBytes, job.columns.rows);
  const prefaultAhead = (): boolean => {
    prefaulter.touchRows(ring.joinedRows, PREFAULT_STEP_ROWS);
    return !prefaulter.finished;
  };
  for (let window = ring.claimOrWait(prefaultAhead); window >= 0; window = ring.claimOrWait(prefaultAhead)) {
    let parsed: ParsedWindow;
    try {
      parsed = { window, rows: parseRingWindow(job.layout, ring, window, job.arrays) };
    } catch (error) {
      parsed = { window, thrown: describeThrown(error) };
    }
    job.port.postMessage(parsed);
    ring.markPosted();
  }
  job.port.close();
});
