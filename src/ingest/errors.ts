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
