import { Command } from 'commander';
import { formatIsoDate } from '../../calendar/days.js';
import { checkOutputsApart, namedInputs } from '../../config/output-paths.js';
import { loadRunConfig } from '../../config/run-config.js';
import { ConfigError } from '../../ingest/errors.js';
import type { FeedPaths } from '../../ingest/feed.js';
import { loadDay } from '../../job/day.js';
import { snapshotStage } from '../../job/stages/snapshot.js';
import { renderInPieces } from '../../report/render.js';
import { tableView } from '../../report/view.js';
import { asOfOption, chosenFormat, formatOption, loadOptionsOf, outOption, parseAsOf } from '../options.js';
import { requireDirectoryLocation } from '../locations.js';
import { emit } from '../output.js';

interface IngestOptions {
  config?: string;
  nav?: string;
  benchmarks?: string;
  master?: string;
  rates?: string;
  holidays?: string;
  actions?: string;
  vendor?: string;
  store?: string;
  feed?: string;
  asOf?: string;
  format?: string;
  out?: string;
}

export function ingestCommand(): Command {
  return new Command('ingest')
    .description("read a day's feed files and keep them as a canonical snapshot in the store")
    .option('--config <file>', 'take the files, profiles, store and feed name from a run configuration')
    .option('--nav <file>', 'NAV feed (series_id, date, nav)')
    .option('--benchmarks <file>', 'benchmark levels')
    .option('--master <file>', 'series master')
    .option('--rates <file>', 'risk-free rates')
    .option('--holidays <file>', 'holidays')
    .option('--actions <file>', 'corporate actions')
    .option('--vendor <file>', "vendor's risk figures")
    .option('--store <dir>', "snapshot store directory (default: the configuration's store, else navassay-store)")
    .option('--feed <name>', "the feed's name in the store (default: the configuration's feed, else feed)")
    .addOption(asOfOption("the configuration's as_of, else today"))
    .addOption(formatOption())
    .addOption(outOption())
    .action(async (options: IngestOptions) => {
      process.exitCode = await runIngest(options);
    });
}

async function runIngest(options: IngestOptions): Promise<number> {
  const config = options.config === undefined ? undefined : loadRunConfig(options.config);
  const paths = config?.paths ?? pathsFromOptions(options);
  const asOf = parseAsOf(options.asOf ?? config?.as_of);
  // What the command line says wins over the configuration, as for --as-of.
  const store = options.store ?? config?.store ?? 'navassay-store';
  const feedName = options.feed ?? config?.feed ?? 'feed';
  requireDirectoryLocation(store, 'the snapshot store');
  const inputs = namedInputs(paths, config ? 'files.' : '--');
  const storeKey = options.store !== undefined || !config ? '--store' : 'store';
  checkOutputsApart(config ? config.path : '--store', inputs, options.out === undefined ? [] : [{ key: '--out', path: options.out }], [
    { key: storeKey, path: store },
  ]);
  const day = await loadDay({ paths, asOf, load: loadOptionsOf(config, asOf) });
  const { feed } = day;
  const { ref: snapshot, notices } = await snapshotStage(day, { store, feed: feedName });
  for (const notice of notices) process.stderr.write(`navassay: ${notice}\n`);
  const answer = {
    feed: feedName,
    as_of: formatIsoDate(asOf),
    snapshot: snapshot.dir,
    rows: feed.rows,
    files: feed.results.map((r) => ({ kind: r.kind, path: r.file, rows: r.rows })),
  };
  const view = tableView(
    `navassay ingest: ${feedName} as of ${answer.as_of}`,
    [`Snapshot: ${snapshot.dir}`, `Rows read ${feed.rows.read}: ${feed.rows.accepted} accepted, ${feed.rows.rejected} rejected (kept in the snapshot's rejected.csv).`],
    ['kind', 'file', 'read', 'accepted', 'rejected'],
    answer.files.map((f) => [f.kind, f.path, f.rows.read, f.rows.accepted, f.rows.rejected]),
    'No files.',
  );
  emit(renderInPieces(chosenFormat(options.format), answer, view), options.out);
  return 0;
}

function pathsFromOptions(options: IngestOptions): FeedPaths {
  const { nav, benchmarks, master, rates, holidays, actions, vendor } = options;
  if (nav === undefined) throw new ConfigError('ingest needs --nav FILE (and any other files of the day) or --config FILE; see navassay ingest --help.');
  return { nav, benchmarks, master, rates, holidays, actions, vendor };
}
