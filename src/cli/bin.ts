#!/usr/bin/env node
import { main } from './main.js';

main(process.argv.slice(2)).then(
  (status) => process.exit(status),
  (error: unknown) => {
    process.stderr.write(`navassay: internal error, please report it with the command you ran: ${(error as Error).stack ?? String(error)}\n`);
    process.exit(70);
  },
);
