import { runAgainIn, startAgain } from '../../src/cli/huge-pages.js';

/**
 * A stand-in for the executable (huge-pages.test.ts): starts itself again as bin.ts does, and the
 * process that runs prints its tunables and Node's options, and ends as its argument says (an
 * exit status, or a signal).
 */
const ending = process.argv[2] ?? '0';
const again = startAgain(process.env, process.platform, process.execArgv);
if (again === null) runHere();
else runAgainIn(again, runHere);

function runHere(): void {
  process.stdout.write(`tunables=${process.env.GLIBC_TUNABLES ?? ''}\n`);
  process.stdout.write(`options=${process.execArgv.filter((option) => option !== '--import' && option !== 'tsx').join(' ')}\n`);
  if (ending.startsWith('SIG')) process.kill(process.pid, ending as NodeJS.Signals);
  else process.exitCode = Number(ending);
}
