import { spawn } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const BIN = fileURLToPath(new URL('../../src/cli/bin.ts', import.meta.url));

export interface ChildRun {
  readonly status: number | null;
  readonly stdout: Buffer;
  readonly stderr: string;
}

/**
 * Runs the executable (src/cli/bin.ts through tsx) as a child process with its output on pipes,
 * as a scheduler or a script would. `slowReader` leaves the pipe unread for a moment and then
 * reads it in small steps, so the writer runs ahead of its reader.
 */
export function runChild(argv: readonly string[], options: { cwd?: string; slowReader?: boolean } = {}): Promise<ChildRun> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', BIN, ...argv], { cwd: options.cwd, stdio: ['ignore', 'pipe', 'pipe'] });
    const chunks: Buffer[] = [];
    let stderr = '';
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString('utf8')));
    if (options.slowReader) {
      child.stdout.pause();
      setTimeout(() => readSlowly(child.stdout, chunks), 400);
    } else {
      child.stdout.on('data', (chunk: Buffer) => chunks.push(chunk));
    }
    child.on('error', reject);
    child.on('close', (status) => resolve({ status, stdout: Buffer.concat(chunks), stderr }));
  });
}

function readSlowly(stream: NodeJS.ReadableStream, chunks: Buffer[]): void {
  stream.on('data', (chunk: Buffer) => {
    chunks.push(chunk);
    stream.pause();
    setTimeout(() => stream.resume(), 5);
  });
  stream.resume();
}
