import { closeSync, openSync, readFileSync, renameSync, rmSync, statSync, writeSync } from 'node:fs';
import { hostname } from 'node:os';
import { join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { InputError } from '../ingest/errors.js';

/**
 * One writer per feed at a time. A writer creates `STORE/<feed>/.lock` exclusively (it fails if
 * the file exists) holding its pid, host and start time, and removes it when done. A second
 * writer waits for it, polling, up to `waitMs`, then stops with "another run holds the store
 * since …". A lock is stale, and is taken over, when the process that holds it is gone (same
 * host, pid no longer running) or when it is older than STALE_AFTER_MS whatever the host: no
 * write takes that long.
 */
export const LOCK_FILE = '.lock';
export const STALE_AFTER_MS = 60 * 60 * 1000;
export const DEFAULT_LOCK_WAIT_MS = 30_000;
const POLL_MS = 50;

interface LockHolder {
  readonly pid: number;
  readonly host: string;
  readonly since: string;
}

export interface FeedLock {
  release(): void;
}

export function lockFeed(feedDir: string, waitMs: number = DEFAULT_LOCK_WAIT_MS, now: () => number = Date.now): FeedLock {
  const path = join(feedDir, LOCK_FILE);
  const deadline = now() + waitMs;
  for (;;) {
    const holder: LockHolder = { pid: process.pid, host: hostname(), since: new Date(now()).toISOString() };
    if (tryCreate(path, holder)) return { release: () => rmSync(path, { force: true }) };
    const current = readHolder(path);
    if (current === null) continue; // released between our attempt and our look
    if (isStale(current, now())) {
      breakStaleLock(path, current);
      continue;
    }
    if (now() >= deadline) {
      throw new InputError(
        `Another run holds the store at ${feedDir} since ${current.since} (pid ${current.pid} on ${current.host}); wait for it to finish, or remove ${path} if that run is gone.`,
      );
    }
    sleep(POLL_MS);
  }
}

function tryCreate(path: string, holder: LockHolder): boolean {
  let fd: number;
  try {
    fd = openSync(path, 'wx');
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'EEXIST') return false;
    throw error;
  }
  try {
    writeSync(fd, JSON.stringify(holder));
  } finally {
    closeSync(fd);
  }
  return true;
}

/**
 * The lock's holder, null when the lock is gone. A lock without readable content is one whose
 * writer is between creating and filling it, or died there: it counts from its file's time.
 */
function readHolder(path: string): LockHolder | null {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    return null;
  }
  try {
    const parsed = JSON.parse(text) as Partial<LockHolder>;
    if (typeof parsed.pid === 'number' && typeof parsed.host === 'string' && typeof parsed.since === 'string') {
      return parsed as LockHolder;
    }
  } catch {
    // a lock written half-way (its writer died between create and write) falls to the age rule
  }
  let since = 0;
  try {
    since = statSync(path).mtimeMs;
  } catch {
    return null;
  }
  return { pid: 0, host: '', since: new Date(since).toISOString() };
}

/** A lock left empty by a writer that died between creating and filling it is stale after this. */
const UNFILLED_STALE_AFTER_MS = 10_000;

export function isStale(holder: LockHolder, nowMs: number): boolean {
  const age = nowMs - Date.parse(holder.since);
  if (!(age < STALE_AFTER_MS)) return true;
  if (holder.pid === 0) return age > UNFILLED_STALE_AFTER_MS;
  return holder.host === hostname() && !processIsAlive(holder.pid);
}

export function processIsAlive(pid: number): boolean {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Moves a stale lock aside and deletes it. The move is atomic, so of two writers that both found
 * it stale only one moves it; the other finds a fresh lock on its next attempt, or none.
 */
function breakStaleLock(path: string, seen: LockHolder): void {
  const aside = `${path}.stale-${process.pid}-${randomBytes(4).toString('hex')}`;
  try {
    renameSync(path, aside);
  } catch {
    return;
  }
  const moved = readHolder(aside);
  if (moved && (moved.pid !== seen.pid || moved.since !== seen.since)) {
    // Another writer took the lock in between: give it back untouched.
    try {
      renameSync(aside, path);
    } catch {
      // it has taken a new one meanwhile; ours was stale anyway
    }
    return;
  }
  rmSync(aside, { force: true });
}

const sleeper = new Int32Array(new SharedArrayBuffer(4));

function sleep(ms: number): void {
  Atomics.wait(sleeper, 0, 0, ms);
}
