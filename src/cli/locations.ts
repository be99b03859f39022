import { statSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { ConfigError } from '../ingest/errors.js';

/**
 * Directories the tool writes into (the demo directory, a report directory, the snapshot
 * store, the folder of an --out file). A location that cannot be a directory (it is a file, or
 * lies under one) is a command-line or configuration mistake: exit 2 with one sentence, before
 * any file is written.
 */
export function requireDirectoryLocation(directory: string, what: string): void {
  let path = resolve(directory);
  for (;;) {
    const kind = kindOf(path);
    if (kind === 'file') {
      const where = path === resolve(directory) ? `"${directory}" is a file` : `"${directory}" lies under the file "${path}"`;
      throw new ConfigError(`${what} ${where}, so it cannot be a directory; choose a directory path.`);
    }
    if (kind === 'directory') return;
    const parent = dirname(path);
    if (parent === path) return;
    path = parent;
  }
}

/** The folder an output file goes into must be usable as a directory, and the file itself must not be one. */
export function requireFileLocation(file: string, what: string): void {
  if (kindOf(resolve(file)) === 'directory') throw new ConfigError(`${what} "${file}" is a directory; name a file to write.`);
  requireDirectoryLocation(dirname(file), `the folder of ${what}`);
}

function kindOf(path: string): 'file' | 'directory' | 'absent' {
  try {
    return statSync(path).isDirectory() ? 'directory' : 'file';
  } catch {
    return 'absent';
  }
}

const LOCATION_CODES: Record<string, string> = {
  ENOTDIR: 'a part of the path is a file, not a directory',
  EISDIR: 'it is a directory',
  EEXIST: 'a file is in the way',
  EACCES: 'permission is denied',
  EPERM: 'permission is denied',
  EROFS: 'the file system is read-only',
  ENOSPC: 'the disk is full',
};

/**
 * The last line of defence for a location the checks above could not foresee (permissions, a
 * full disk): one sentence with exit 2 instead of an internal error with a stack trace.
 */
export function unusableLocation(error: unknown): ConfigError | undefined {
  const { code, path } = (error ?? {}) as NodeJS.ErrnoException;
  if (code === undefined || path === undefined || !(code in LOCATION_CODES)) return undefined;
  return new ConfigError(`cannot write "${path}" (${LOCATION_CODES[code]}); choose a location navassay can write to.`);
}
