import { ConfigError, InputError, NavassayError } from '../ingest/errors.js';

/**
 * An error thrown on a worker thread, as it crosses to the thread that waits for the work. A
 * structured clone keeps an error's message but not its class, and the command line's exit
 * status comes from the class (docs/interface.md), so the class travels by name with the fields
 * the command line reads (an errno code and path for a location it cannot use).
 */
export interface ThrownElsewhere {
  readonly name: string;
  readonly message: string;
  readonly stack?: string;
  readonly exitCode?: 2 | 3;
  readonly code?: string;
  readonly path?: string;
  readonly syscall?: string;
}

export function describeThrown(error: unknown): ThrownElsewhere {
  if (!(error instanceof Error)) return { name: 'Error', message: String(error) };
  const errno = error as NodeJS.ErrnoException;
  return {
    name: error.name,
    message: error.message,
    stack: error.stack,
    exitCode: error instanceof NavassayError ? error.exitCode : undefined,
    code: errno.code,
    path: errno.path,
    syscall: errno.syscall,
  };
}

/** The error again, of the class the command line knows when it was one of ours. */
export function rebuildThrown(thrown: ThrownElsewhere): Error {
  const error = ourError(thrown) ?? Object.assign(new Error(thrown.message), errnoFields(thrown));
  error.name = thrown.name;
  if (thrown.stack) error.stack = thrown.stack;
  return error;
}

function ourError(thrown: ThrownElsewhere): NavassayError | null {
  if (thrown.exitCode === undefined) return null;
  if (thrown.name === 'ConfigError') return new ConfigError(thrown.message);
  if (thrown.name === 'InputError') return new InputError(thrown.message);
  return new NavassayError(thrown.message, thrown.exitCode);
}

function errnoFields(thrown: ThrownElsewhere): Partial<NodeJS.ErrnoException> {
  const fields: Partial<NodeJS.ErrnoException> = {};
  if (thrown.code !== undefined) fields.code = thrown.code;
  if (thrown.path !== undefined) fields.path = thrown.path;
  if (thrown.syscall !== undefined) fields.syscall = thrown.syscall;
  return fields;
}
