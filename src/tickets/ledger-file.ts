import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { ConfigError, InputError } from '../ingest/errors.js';
import { renameDurably, writeFileDurably } from '../store/durable-files.js';
import { emptyLedger, LEDGER_FORMAT, type TicketLedger } from './ledger.js';

/**
 * Where the ledger lives: beside the feed's snapshots, in the store directory,
 *
 *   STORE/<feed>/tickets/ledger.json
 *
 * written with the store's durable steps (temporary file flushed, renamed into place, directory
 * flushed), so a crash leaves yesterday's ledger or today's, never half of one.
 */
export function ledgerPath(storeDir: string, feed: string): string {
  // A feed name is one plain directory name: nothing a configuration says can lead outside the store.
  if (!FEED_NAME.test(feed)) throw new ConfigError(`feed name "${feed}" must start with a letter or digit and use only letters, digits, dot, dash or underscore; fix feed: in the run configuration.`);
  return join(storeDir, feed, 'tickets', 'ledger.json');
}

const FEED_NAME = /^[A-Za-z0-9][A-Za-z0-9._-]{0,127}$/;

export function readLedger(storeDir: string, feed: string): TicketLedger {
  const path = ledgerPath(storeDir, feed);
  if (!existsSync(path)) return emptyLedger(feed);
  let ledger: TicketLedger;
  try {
    ledger = JSON.parse(readFileSync(path, 'utf8')) as TicketLedger;
  } catch {
    throw new InputError(`${path}: the ticket ledger cannot be read; restore it from a backup or remove it to start the ticket history again.`);
  }
  if (ledger.format !== LEDGER_FORMAT) throw new InputError(`${path}: the ticket ledger has format "${String(ledger.format)}", not ${LEDGER_FORMAT}; use the navassay version that wrote it.`);
  return ledger;
}

export function writeLedger(storeDir: string, ledger: TicketLedger): string {
  const path = ledgerPath(storeDir, ledger.feed);
  const directory = dirname(path);
  mkdirSync(directory, { recursive: true });
  const temporary = join(directory, `.ledger.${process.pid}.tmp`);
  rmSync(temporary, { force: true });
  writeFileDurably(temporary, JSON.stringify(ledger, null, 1) + '\n');
  renameDurably(temporary, path, directory);
  return path;
}
