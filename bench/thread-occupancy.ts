/**
 * Which threads keep the cores busy, and when: runs a command and samples the CPU time of every
 * thread of its processes (the command, and the process the executable starts itself again in)
 * from /proc every `--every` milliseconds. Prints one line per sample: the share of the cores
 * in use, then each busy thread's share of one core, by thread number in order of start (0 is a
 * process's main thread; Node's worker threads and the engine's helpers follow). Linux only.
 *
 *   npm run build
 *   node dist/bench/thread-occupancy.js -- node dist/src/cli/bin.js run navassay.yaml --quiet
 *   node dist/bench/thread-occupancy.js --every 250 -- node dist/bench/checks-fingerprint.js --only demo
 *
 * A core left idle while one thread works alone is what more threads could take (it is how
 * session 9 found the engine's helper threads using a fifth of a run's CPU, docs/performance.md).
 */
import { spawn } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';
import { cpus } from 'node:os';

const CLOCK_TICKS_PER_SECOND = 100; // USER_HZ on Linux

interface ThreadSample {
  /** "process index.thread index", in order of first sight. */
  readonly label: string;
  readonly ticks: number;
}

const args = process.argv.slice(2);
const dashes = args.indexOf('--');
if (process.platform !== 'linux' || dashes < 0 || dashes === args.length - 1) {
  console.error('usage (Linux): node dist/bench/thread-occupancy.js [--every MS] -- COMMAND [ARG…]');
  process.exit(2);
}
const every = Number(args[args.indexOf('--every') + 1] ?? 500) || 500;
const [command, ...commandArgs] = args.slice(dashes + 1);

const processIndex = new Map<number, number>();
const threadIndex = new Map<string, number>();

/** The process `pid` and every process below it. */
function processTree(pid: number): number[] {
  const tree = [pid];
  for (let i = 0; i < tree.length; i++) {
    for (const task of tasksOf(tree[i])) {
      try {
        for (const child of readFileSync(`/proc/${tree[i]}/task/${task}/children`, 'utf8').trim().split(/\s+/)) if (child) tree.push(Number(child));
      } catch {
        // the task ended between the listing and the read
      }
    }
  }
  return tree;
}

function tasksOf(pid: number): string[] {
  try {
    return readdirSync(`/proc/${pid}/task`);
  } catch {
    return [];
  }
}

/** User and system ticks of every thread of the tree. */
function sample(root: number): ThreadSample[] {
  const samples: ThreadSample[] = [];
  for (const pid of processTree(root)) {
    if (!processIndex.has(pid)) processIndex.set(pid, processIndex.size);
    for (const task of tasksOf(pid)) {
      try {
        const stat = readFileSync(`/proc/${pid}/task/${task}/stat`, 'utf8');
        const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
        const key = `${pid}/${task}`;
        if (!threadIndex.has(key)) threadIndex.set(key, [...threadIndex.keys()].filter((k) => k.startsWith(`${pid}/`)).length);
        samples.push({ label: `${processIndex.get(pid)}.${threadIndex.get(key)}`, ticks: Number(fields[11]) + Number(fields[12]) });
      } catch {
        // the thread ended between the listing and the read
      }
    }
  }
  return samples;
}

const cores = cpus().length;
const child = spawn(command, commandArgs, { stdio: ['ignore', 'ignore', 'inherit'] });
const started = Date.now();
const last = new Map<string, number>();
const totals = new Map<string, number>();
let previousAt = started;

const timer = setInterval(() => {
  const now = Date.now();
  const capacity = ((now - previousAt) / 1000) * CLOCK_TICKS_PER_SECOND;
  previousAt = now;
  const busy: string[] = [];
  let used = 0;
  for (const { label, ticks } of sample(child.pid!)) {
    const delta = ticks - (last.get(label) ?? 0);
    last.set(label, ticks);
    totals.set(label, ticks);
    used += delta;
    if (delta >= capacity * 0.05) busy.push(`${label} ${Math.round((100 * delta) / capacity)}%`);
  }
  const share = Math.round((100 * used) / (capacity * cores));
  console.log(`${((now - started) / 1000).toFixed(1).padStart(6)} s  cores ${String(share).padStart(3)}%  ${busy.join('  ')}`);
}, every);

child.on('exit', (status) => {
  clearInterval(timer);
  const wall = (Date.now() - started) / 1000;
  const cpu = [...totals.values()].reduce((sum, ticks) => sum + ticks, 0) / CLOCK_TICKS_PER_SECOND;
  const threads = [...totals].filter(([, ticks]) => ticks >= CLOCK_TICKS_PER_SECOND / 10).map(([label, ticks]) => `${label} ${(ticks / CLOCK_TICKS_PER_SECOND).toFixed(2)} s`);
  console.log(`wall ${wall.toFixed(2)} s, CPU ${cpu.toFixed(2)} s seen (${cores} cores; threads of 0.1 s and more): ${threads.join(', ')}`);
  process.exitCode = status ?? 1;
});
