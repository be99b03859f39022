/**
 * Errors that stop a command. Each carries the exit status of docs/interface.md and a message of one
 * sentence naming the file, the line and what to do.
 */
export class NavassayError extends Error {
  constructor(
    message: string,
    readonly exitCode: 2 | 3,
  ) {
    super(message);
    this.name = new.target.name;
  }
}

/** The command line or the run configuration is wrong (exit 2). */
export class ConfigError extends NavassayError {
  constructor(message: string) {
    super(message, 2);
  }
}

/** An input file could not be opened or has no usable header (exit 3). */
export class InputError extends NavassayError {
  constructor(message: string) {
    super(message, 3);
  }
}

/** Longest piece of input an error message quotes; the rest is cut, so a message stays one readable sentence. */
export const MESSAGE_QUOTE_LIMIT = 80;

/**
 * A piece of input as an error message shows it: in quotes, control and invisible characters as `\uXXXX`,
 * and cut to MESSAGE_QUOTE_LIMIT characters with the full length said, never the whole of a
 * 20 MB value.
 */
export function quoteInput(text: string, limit = MESSAGE_QUOTE_LIMIT): string {
  if (text.length <= limit) return `"${visible(text)}"`;
  return `"${visible(text.slice(0, limit))}…" (${text.length} characters)`;
}

/** Control, invisible and replacement characters written as `\uXXXX`, so a message shows them. */
function visible(text: string): string {
  return text.replace(/[\p{Cc}\p{Cf}\uFFFD]/gu, (c) => `\\u${c.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}`);
}

/** Like `quoteInput` without the quotes, for a decoder's own message inside ours. */
export function cutInput(text: string, limit = MESSAGE_QUOTE_LIMIT * 2): string {
  const line = text.split('\n')[0];
  return line.length <= limit ? line : `${line.slice(0, limit)}…`;
}
