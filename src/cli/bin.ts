#!/usr/bin/env node
import { runAgainIn, startAgain } from './huge-pages.js';

/**
 * The executable. It never calls process.exit: that would end the process while standard output,
 * when it is a pipe, still holds unwritten data (a scheduler or `jq` would get a truncated
 * answer). It sets the exit status and lets Node end once both streams have drained.
 *
 * On Linux it first starts itself again with huge pages asked for (huge-pages.ts) and the
 * engine's settings for two busy cores (engine-flags.ts), and only that second process loads the
 * program.
 */
const INTERNAL_ERROR = 70;

const again = startAgain(process.env, process.platform, process.execArgv);
if (again === null) runHere();
else runAgainIn(again, runHere);

function runHere(): void {
  for (const stream of [process.stdout, process.stderr]) stream.on('error', onStreamError);
  import('./main.js')
    .then(({ main }) => main(process.argv.slice(2)))
    .then(
      (status) => {
        process.exitCode = status;
      },
      (error: unknown) => {
        process.exitCode = INTERNAL_ERROR;
        process.stderr.write(`navassay: internal error, please report it with the command you ran: ${(error as Error).stack ?? String(error)}\n`);
      },
    );
}

/**
 * A reader that closes the pipe early (`navassay … | head -1`) has read what it wanted: that is a
 * normal end, not an error, so the rest of the output is dropped quietly.
 */
function onStreamError(error: NodeJS.ErrnoException): void {
  if (error.code === 'EPIPE' || error.code === 'ERR_STREAM_DESTROYED') return;
  process.exitCode = INTERNAL_ERROR;
}
