import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { demoFiles } from '../../src/demo/scenario.js';

/**
 * The package as another project gets it: `npm pack` (which compiles), the tarball installed
 * into a fresh project, then the README's library example type-checked and run there, and the
 * entry imported from plain Node. Dependencies come from the npm cache when it holds them,
 * else from the registry (`--prefer-offline`).
 */
const REPOSITORY = resolve('.');
const TSC = join(REPOSITORY, 'node_modules', 'typescript', 'bin', 'tsc');

function npm(args: string[], cwd: string): string {
  return execFileSync('npm', args, { cwd, encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'] });
}

function installTarball(consumer: string, tarball: string): void {
  const common = ['install', '--no-audit', '--no-fund', '--ignore-scripts', tarball];
  try {
    npm([...common, '--offline'], consumer);
  } catch {
    npm([...common, '--prefer-offline'], consumer);
  }
}

/** The ```ts block of the README's "As a library" section. */
function readmeLibraryExample(): string {
  const readme = readFileSync('README.md', 'utf8');
  const section = readme.slice(readme.indexOf('## As a library'));
  const match = /```ts\n([\s\S]*?)```/.exec(section);
  if (!match) throw new Error('README has no ```ts example under "## As a library"');
  return match[1];
}

/** The demo feed with its benchmark file rewritten in the canonical layout (the demo writes it in a vendor's). */
function writeCanonicalDemo(dir: string): void {
  const files = demoFiles();
  for (const name of ['nav.csv', 'master.csv', 'actions.csv', 'rates.csv', 'holidays.csv']) writeFileSync(join(dir, name), files[name]);
  const [, ...rows] = files['benchmarks.csv'].trim().split('\n');
  const canonical = rows.map((row) => {
    const [id, date, level] = row.split(';');
    const [day, month, year] = date.split('/');
    return `${id},${year}-${month}-${day},${level.replace(',', '.')}`;
  });
  writeFileSync(join(dir, 'benchmarks.csv'), ['benchmark_id,date,level', ...canonical].join('\n') + '\n');
}

describe('the installed package', () => {
  it('imports in plain Node and in TypeScript, and runs the README example', () => {
    const work = mkdtempSync(join(tmpdir(), 'navassay-pack-'));
    npm(['pack', '--pack-destination', work], REPOSITORY);
    const tarball = join(work, readdirSync(work).find((name) => name.endsWith('.tgz'))!);
    const consumer = join(work, 'consumer');
    execFileSync('mkdir', [consumer]);
    writeFileSync(join(consumer, 'package.json'), JSON.stringify({ name: 'consumer', version: '1.0.0', type: 'module', private: true }));
    installTarball(consumer, tarball);

    writeCanonicalDemo(consumer);

    // Plain Node: the entry resolves through `exports`, and a day number for a date is refused.
    const plain = spawnSync(
      process.execPath,
      [
        '--input-type=module',
        '-e',
        `import { checkFeed, computeFigures, loadFeed, ConfigError } from 'navassay';
         if (typeof checkFeed !== 'function' || typeof computeFigures !== 'function' || typeof loadFeed !== 'function') process.exit(10);
         const feed = await loadFeed({ nav: 'nav.csv' });
         try { checkFeed(feed, { asOf: 20787 }); process.exit(11); } catch (error) { if (!(error instanceof ConfigError)) process.exit(12); }
         console.log(checkFeed(feed, { asOf: '2026-11-30' }).as_of);`,
      ],
      { cwd: consumer, encoding: 'utf8' },
    );
    expect(plain.stderr).toBe('');
    expect(plain.status).toBe(0);
    expect(plain.stdout.trim()).toBe('2026-11-30');

    // TypeScript: the README example type-checks against the installed declarations and runs;
    // a day number where a date belongs is a type error.
    writeFileSync(join(consumer, 'example.ts'), readmeLibraryExample());
    writeFileSync(
      join(consumer, 'types.ts'),
      `import { checkFeed, type LoadedFeed, type CheckAnswer } from 'navassay';
       export function wrong(feed: LoadedFeed): CheckAnswer {
         // @ts-expect-error a day number is not a date
         return checkFeed(feed, { asOf: 20787 });
       }\n`,
    );
    writeFileSync(
      join(consumer, 'tsconfig.json'),
      JSON.stringify({
        compilerOptions: {
          target: 'ES2022', module: 'NodeNext', moduleResolution: 'NodeNext', strict: true, outDir: 'out',
          types: ['node'], typeRoots: [join(REPOSITORY, 'node_modules', '@types')],
        },
        include: ['example.ts', 'types.ts'],
      }),
    );
    const compiled = spawnSync(process.execPath, [TSC, '-p', consumer], { cwd: consumer, encoding: 'utf8' });
    expect(compiled.stdout + compiled.stderr).toBe('');
    expect(compiled.status).toBe(0);
    const example = spawnSync(process.execPath, [join(consumer, 'out', 'example.js')], { cwd: consumer, encoding: 'utf8' });
    expect(example.stderr).toBe('');
    expect(example.status).toBe(0);
    expect(example.stdout).toContain("metric: 'sharpe'");
  }, 600_000); // packing compiles the whole project, and installing may reach the registry
});
