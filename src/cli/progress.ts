/**
 * The progress line of long stages: one line rewritten in place on a terminal (standard error),
 * nothing at all when standard error is not a terminal or with --quiet.
 */
export interface Progress {
  stage(text: string): void;
  done(): void;
}

export function progressLine(quiet: boolean, stream: NodeJS.WriteStream = process.stderr): Progress {
  if (quiet || !stream.isTTY) return { stage() {}, done() {} };
  const width = Math.max(20, (stream.columns || 80) - 1);
  let shown = false;
  return {
    stage(text) {
      stream.write(`\r${`navassay: ${text}`.slice(0, width).padEnd(width)}`);
      shown = true;
    },
    done() {
      if (shown) stream.write(`\r${' '.repeat(width)}\r`);
      shown = false;
    },
  };
}

/** Colour on a terminal unless NO_COLOR is set (https://no-color.org). */
export function colourWanted(stream: NodeJS.WriteStream = process.stdout): boolean {
  return Boolean(stream.isTTY) && !process.env.NO_COLOR;
}
