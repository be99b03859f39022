/**
 * Splits CSV bytes into rows and fields without building strings: each row leaves the byte
 * range of every field in `starts`/`ends`. Quoted fields follow RFC 4180 (a doubled quote is a
 * literal quote, a quoted field may span lines). A row whose quotes do not balance is cut back
 * to its own physical line and flagged, so the rows after it are still read. A line ends at LF,
 * CRLF or a lone CR; line numbers count physical lines that way.
 */
const LF = 10;
const CR = 13;

export class CsvRowScanner {
  readonly starts: Int32Array;
  readonly ends: Int32Array;
  /** 1 where the field was quoted and may hold doubled quotes to unescape. */
  readonly quoted: Uint8Array;
  fieldCount = 0;
  rowStart = 0;
  /** End of the row's text, before its line ending. */
  rowEnd = 0;
  /** Physical line number where the row starts (1-based). */
  line = 0;
  /** Why the row could not be split, or null. */
  error: string | null = null;
  /** True when a quoted field carried the row over more than one physical line. */
  spansLines = false;
  /** True when a quoted field found no closing quote before the end of the bytes. */
  quoteRanOut = false;

  private position: number;
  private nextLine = 1;

  constructor(
    private readonly bytes: Uint8Array,
    begin: number,
    private readonly delimiter: number,
    private readonly quote: number,
    maxFields: number,
  ) {
    this.position = begin;
    this.starts = new Int32Array(maxFields);
    this.ends = new Int32Array(maxFields);
    this.quoted = new Uint8Array(maxFields);
  }

  /** Where the next row starts, and its line number. */
  get nextPosition(): number {
    return this.position;
  }

  get nextLineNumber(): number {
    return this.nextLine;
  }

  /** Moves to a row start that another reader found. */
  seek(position: number, line: number): void {
    this.position = position;
    this.nextLine = line;
  }

  /** Reads the next row; false at the end of the input. */
  next(): boolean {
    const bytes = this.bytes;
    const length = bytes.length;
    if (this.position >= length) return false;
    this.rowStart = this.position;
    this.line = this.nextLine;
    this.fieldCount = 0;
    this.error = null;
    this.spansLines = false;
    this.quoteRanOut = false;
    let position = this.position;
    for (;;) {
      const fieldStart = position;
      if (position < length && bytes[position] === this.quote) {
        const close = this.closingQuote(position + 1);
        if (close < 0) {
          this.quoteRanOut = true;
          return this.failOnPhysicalLine('a quoted field is never closed (unbalanced quote)');
        }
        if (!this.spansLines && hasLineBreak(bytes, fieldStart, close)) this.spansLines = true;
        this.record(fieldStart + 1, close, 1);
        position = close + 1;
        if (position < length && bytes[position] !== this.delimiter && bytes[position] !== LF && bytes[position] !== CR) {
          return this.failOnPhysicalLine('text follows a closing quote (unbalanced quote)');
        }
      } else {
        while (position < length) {
          const c = bytes[position];
          if (c === this.delimiter || c === LF || c === CR) break;
          position++;
        }
        this.record(fieldStart, position, 0);
      }
      if (position < length && bytes[position] === this.delimiter) {
        position++;
        continue;
      }
      break;
    }
    this.rowEnd = position;
    this.position = skipLineEnding(bytes, position);
    this.nextLine += this.spansLines ? 1 + countLineBreaks(bytes, this.rowStart, this.rowEnd) : 1;
    return true;
  }

  /**
   * True when the row just read is certainly whole. When the bytes are only a window of the
   * file (`final` false), a row that reaches their end, or whose quote found no closing quote
   * in them, may go on in the bytes that follow.
   */
  isWhole(final: boolean): boolean {
    return final || (this.position < this.bytes.length && !this.quoteRanOut);
  }

  /** True for a line with nothing on it (not a data row). */
  isBlank(): boolean {
    // Spaces and tabs only, whatever the delimiter: a tab-delimited line of tabs holds no value either.
    if (this.error !== null) return false;
    for (let i = this.rowStart; i < this.rowEnd; i++) if (this.bytes[i] !== 32 && this.bytes[i] !== 9) return false;
    return true;
  }

  private record(start: number, end: number, quoted: number): void {
    const k = this.fieldCount++;
    if (k < this.starts.length) {
      this.starts[k] = start;
      this.ends[k] = end;
      this.quoted[k] = quoted;
    }
  }

  private closingQuote(from: number): number {
    const bytes = this.bytes;
    let at = from;
    for (;;) {
      const q = bytes.indexOf(this.quote, at);
      if (q < 0) return -1;
      if (bytes[q + 1] !== this.quote) return q;
      at = q + 2;
    }
  }

  /** Gives up on the row: it becomes its first physical line, and reading resumes after it. */
  failOnPhysicalLine(reason: string): boolean {
    const bytes = this.bytes;
    let end = this.rowStart;
    while (end < bytes.length && bytes[end] !== LF && bytes[end] !== CR) end++;
    this.rowEnd = end;
    this.error = reason;
    this.spansLines = false;
    this.position = skipLineEnding(bytes, end);
    this.nextLine = this.line + 1;
    return true;
  }
}

function skipLineEnding(bytes: Uint8Array, position: number): number {
  if (bytes[position] === CR) position++;
  if (bytes[position] === LF) position++;
  return position;
}

/** True when the range holds a line break (LF, CR or CRLF): a quoted field that spans lines. */
function hasLineBreak(bytes: Uint8Array, start: number, end: number): boolean {
  for (let i = start; i < end; i++) if (bytes[i] === LF || bytes[i] === CR) return true;
  return false;
}

/** Line breaks in the range, counting CRLF once and a lone CR or LF once, as the scanner does. */
function countLineBreaks(bytes: Uint8Array, start: number, end: number): number {
  let count = 0;
  for (let i = start; i < end; i++) {
    if (bytes[i] === LF) count++;
    else if (bytes[i] === CR) {
      count++;
      if (bytes[i + 1] === LF && i + 1 < end) i++;
    }
  }
  return count;
}
