/**
 * Lines of a large text file (a CSV of 360,000 figures) in pieces of about 64 K characters, each
 * line followed by a line break: joined, the pieces are `[...lines].join('\n') + '\n'`. The
 * file writer encodes each piece as it comes, so the whole text is never one string.
 */
export function* linesInPieces(lines: Iterable<string>): Generator<string> {
  let piece = '';
  for (const line of lines) {
    piece += line + '\n';
    if (piece.length >= PIECE_CHARACTERS) {
      yield piece;
      piece = '';
    }
  }
  if (piece.length > 0) yield piece;
}

const PIECE_CHARACTERS = 1 << 16;

/**
 * Text written a piece at a time into one reused byte buffer, for a file of many short cells
 * (figures.csv: 360,000 lines of seven cells). Lines built as template strings were trees of
 * small strings joined again into a piece: garbage of several times the text, and a tree that a
 * collection caught half built was copied and kept. Here each cell's characters go straight into
 * the buffer, one byte each, and a full piece is read back as one flat string (Latin-1, a plain
 * copy), which the file writer encodes. A cell holding a character beyond Latin-1 is kept as the
 * string it is, beside the bytes before it, so the pieces join to exactly the text written (a
 * lone surrogate included).
 */
export class TextPieceBuilder {
  private bytes = Buffer.allocUnsafe(PIECE_BYTES + MARGIN_BYTES);
  private used = 0;
  /** The piece's text before its bytes, when it holds cells beyond Latin-1. */
  private before: string[] = [];
  private beforeLength = 0;

  /** Whether the piece holds enough text to be taken. */
  get full(): boolean {
    return this.used + this.beforeLength >= PIECE_BYTES;
  }

  /** Writes `text` whole. */
  text(text: string): void {
    const length = text.length;
    if (this.used + length > this.bytes.length) this.grow(length);
    const bytes = this.bytes;
    let at = this.used;
    for (let i = 0; i < length; i++) {
      const code = text.charCodeAt(i);
      if (code > 0xff) {
        this.keepAsString(text);
        return;
      }
      bytes[at++] = code;
    }
    this.used = at;
  }

  /** Writes one Latin-1 character (a comma, a line feed) by its code. */
  code(code: number): void {
    if (this.used === this.bytes.length) this.grow(1);
    this.bytes[this.used++] = code;
  }

  /** The text written since the last piece, as one string; the buffer is then reused. */
  take(): string {
    const tail = this.bytes.toString('latin1', 0, this.used);
    const piece = this.before.length === 0 ? tail : this.before.join('') + tail;
    this.used = 0;
    this.before = [];
    this.beforeLength = 0;
    return piece;
  }

  /** A text beyond Latin-1: the bytes so far become a string, and the text follows them as it is. */
  private keepAsString(text: string): void {
    this.before.push(this.bytes.toString('latin1', 0, this.used), text);
    this.beforeLength += this.used + text.length;
    this.used = 0;
  }

  private grow(more: number): void {
    const larger = Buffer.allocUnsafe(Math.max(this.bytes.length * 2, this.used + more));
    this.bytes.copy(larger, 0, 0, this.used);
    this.bytes = larger;
  }
}

const PIECE_BYTES = 1 << 16;
/** Room past a piece's size, so that a line seldom makes the buffer grow. */
const MARGIN_BYTES = 1 << 12;
