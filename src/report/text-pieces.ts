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
