/**
 * Taking the page faults of fresh shared memory on another thread. Memory is given to a process
 * page by page (4 KiB) the first time it is written, and on this machine that costs about 4 ms of
 * CPU per MiB: for the NAV file's columns (516 MB), about as much as parsing their rows. A thread
 * with nothing else to do can take those faults ahead of the thread that will write the rows.
 *
 * It touches each page with `Atomics.compareExchange(page, 0, 0)`: a write access (so the page is
 * given) that never changes a value, whatever the other thread writes at the same moment (the
 * exchange is one indivisible read and write, and it only ever writes back 0 over a 0). So the
 * columns hold the same bytes whether their pages were touched first or not.
 */
const PAGE_BYTES = 4096;

export class Prefaulter {
  private readonly pages: Int32Array[];
  /** The next row whose pages to touch. */
  private row = 0;

  /** `buffers`: the column arrays' memory; `rowBytes`: the bytes of one row in each. */
  constructor(
    buffers: readonly SharedArrayBuffer[],
    private readonly rowBytes: readonly number[],
    private readonly rows: number,
  ) {
    this.pages = buffers.map((buffer) => new Int32Array(buffer));
  }

  get finished(): boolean {
    return this.row >= this.rows;
  }

  /** Touches the pages of the next `count` rows, from `fromRow` on if that is further. */
  touchRows(fromRow: number, count: number): void {
    const first = Math.max(this.row, fromRow);
    const end = Math.min(this.rows, first + count);
    this.pages.forEach((pages, k) => {
      const bytes = this.rowBytes[k];
      const firstPage = Math.ceil((first * bytes) / PAGE_BYTES);
      const lastByte = Math.min(end * bytes, pages.byteLength);
      for (let at = firstPage * PAGE_BYTES; at < lastByte; at += PAGE_BYTES) Atomics.compareExchange(pages, at >> 2, 0, 0);
    });
    this.row = end;
  }
}
