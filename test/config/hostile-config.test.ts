import fc from 'fast-check';
import { linkSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadRunConfig } from '../../src/config/run-config.js';
import { NavassayError } from '../../src/ingest/errors.js';
import { runCli, scratchDir, writeFiles } from '../cli/run-cli.js';

const NAV = 'series_id,date,nav\nNVA0001,2026-01-02,100\nNVA0001,2026-01-05,101\n';

function configError(dir: string, yaml: string): NavassayError {
  writeFileSync(join(dir, 'run.yaml'), yaml);
  try {
    loadRunConfig(join(dir, 'run.yaml'));
  } catch (error) {
    return error as NavassayError;
  }
  throw new Error('expected the configuration to be refused');
}

describe('hostile YAML ends in one sentence with exit 2', () => {
  it('an alias bomb (aliases of aliases, nine wide, twelve deep)', () => {
    let yaml = 'files: {nav: nav.csv}\nx0: &a0 [1, 2, 3, 4, 5, 6, 7, 8, 9]\n';
    for (let k = 1; k <= 12; k++) yaml += `x${k}: &a${k} [${Array.from({ length: 9 }, () => `*a${k - 1}`).join(', ')}]\n`;
    const error = configError(scratchDir(), yaml);
    expect(error.exitCode).toBe(2);
    expect(error.message).toContain('expands its aliases (*name) more than 100 times');
  });

  it('deep nesting, in flow and in block style', () => {
    const flow = configError(scratchDir(), `files: {nav: nav.csv}\ndeep: ${'['.repeat(5000)}${']'.repeat(5000)}\n`);
    expect(flow.exitCode).toBe(2);
    const block = configError(scratchDir(), `files: {nav: nav.csv}\n${Array.from({ length: 200 }, (_, k) => `${' '.repeat(k)}k:`).join('\n')} 1\n`);
    expect(block.exitCode).toBe(2);
    expect(block.message).toMatch(/nests deeper than 64 levels|cannot be read/);
  });

  it('the document may raise its own depth limit', () => {
    const dir = scratchDir();
    writeFiles(dir, { 'nav.csv': NAV });
    const nested = `${'['.repeat(80)}${']'.repeat(80)}`;
    expect(configError(dir, `files: {nav: nav.csv}\nchecks: ${nested}\n`).message).toContain('nests deeper than 64 levels');
    const raised = configError(dir, `limits: {yaml_max_depth: 200}\nfiles: {nav: nav.csv}\nchecks: ${nested}\n`);
    expect(raised.message).not.toContain('nests deeper'); // past the depth check, refused by validation instead
  });

  it('a configuration larger than the limit is refused before it is parsed', () => {
    const dir = scratchDir();
    const error = configError(dir, `files: {nav: nav.csv}\n# ${'x'.repeat(2 * 1024 * 1024)}\n`);
    expect(error.exitCode).toBe(2);
    expect(error.message).toMatch(/is \d+ bytes, more than the limit of 1048576; .*NAVASSAY_MAX_CONFIG_BYTES/);
  });

  it.each(['constructor', 'toString', '__proto__'])('a profile named %s is refused by name, and naming it without defining it is an unknown profile', (name) => {
    const dir = scratchDir();
    const defined = configError(dir, `files: {nav: nav.csv}\nprofiles:\n  ${name}: {decimal: ","}\n`);
    expect(defined.exitCode).toBe(2);
    expect(defined.message).toMatch(new RegExp(`line 3: profiles\\.${name.replace(/_/g, '_')}: the name "${name}" is reserved`));
    const named = configError(dir, `files: {nav: {path: nav.csv, profile: ${name}}}\n`);
    expect(named.exitCode).toBe(2);
    expect(named.message).toContain(`files.nav.profile names "${name}", which is not under profiles`);
  });

  it('a multi-byte or newline delimiter is refused at validation, naming the key', () => {
    const dir = scratchDir();
    const multi = configError(dir, 'files: {nav: {path: nav.csv, profile: v}}\nprofiles:\n  v: {delimiter: "→"}\n');
    expect(multi.message).toMatch(/line 3: profiles\.v\.delimiter: must be one ASCII character other than a line break/);
    const newline = configError(dir, 'files: {nav: {path: nav.csv, profile: v}}\nprofiles:\n  v: {delimiter: "\\n"}\n');
    expect(newline.message).toContain('a line break');
  });

  it('a 20 MB feed name is not echoed', () => {
    const error = configError(scratchDir(), `files: {nav: nav.csv}\nfeed: "${'é'.repeat(300_000)}"\n`);
    expect(error.message.length).toBeLessThan(500);
  });
});

describe('outputs never land on an input', () => {
  it('refuses files.nav named like the quarantine in the output directory, and the input is untouched', async () => {
    const dir = scratchDir();
    writeFiles(dir, { 'quarantine.csv': NAV, 'run.yaml': 'as_of: 2026-01-05\nfiles: {nav: quarantine.csv}\noutput: {dir: .}\nstore: store\n' });
    const result = await runCli('run', join(dir, 'run.yaml'), '--format', 'json');
    expect(result.status).toBe(2);
    expect(result.stderr).toMatch(/run\.yaml: output\.dir would write .*quarantine\.csv, which is the input files\.nav; send the output to another directory/);
    expect(readFileSync(join(dir, 'quarantine.csv'), 'utf8')).toBe(NAV);
  });

  it('catches a second name for the same file (a hard link) as well', () => {
    const dir = scratchDir();
    writeFiles(dir, { 'feed.csv': NAV });
    linkSync(join(dir, 'feed.csv'), join(dir, 'check.json'));
    const error = configError(dir, 'files: {nav: feed.csv}\noutput: {dir: ., formats: [json]}\n');
    expect(error.message).toContain('which is the input files.nav');
  });

  it('refuses a store or output directory under /proc, where a recursive mkdir never returns', () => {
    const dir = scratchDir();
    writeFiles(dir, { 'nav.csv': NAV });
    expect(configError(dir, 'files: {nav: nav.csv}\nstore: /proc/self/store\n').message).toMatch(/store \(.*proc\/self\/store\) is on a system pseudo file system/);
    expect(configError(dir, 'files: {nav: nav.csv}\noutput: {dir: /proc/self/out}\n').message).toContain('output.dir');
  });

  it('refuses an input inside the store, and --out on an input', async () => {
    const dir = scratchDir();
    writeFiles(dir, { 'nav.csv': NAV });
    expect(configError(dir, 'files: {nav: nav.csv}\nstore: .\n').message).toMatch(/the input files\.nav \(.*nav\.csv\) lies inside store/);
    const out = await runCli('check', '--nav', join(dir, 'nav.csv'), '--out', join(dir, 'nav.csv'), '--as-of', '2026-01-05');
    expect(out.status).toBe(2);
    expect(out.stderr).toContain('--out would write');
    expect(readFileSync(join(dir, 'nav.csv'), 'utf8')).toBe(NAV);
  });
});

describe('arbitrary bytes as a run configuration', () => {
  it('load or stop with exit 2 or 3, never another exception', () => {
    const dir = scratchDir();
    const yamlish = fc.stringMatching(/^[a-z:{}[\]&*,\-\n "'!|>#0-9.]{0,200}$/);
    fc.assert(
      fc.property(fc.oneof(fc.uint8Array({ maxLength: 300 }).map((bytes) => Buffer.from(bytes)), yamlish.map((text) => Buffer.from(`files: {nav: nav.csv}\n${text}`))), (bytes) => {
        writeFileSync(join(dir, 'any.yaml'), bytes);
        try {
          loadRunConfig(join(dir, 'any.yaml'));
        } catch (error) {
          expect(error).toBeInstanceOf(NavassayError);
          expect([2, 3]).toContain((error as NavassayError).exitCode);
        }
      }),
      { numRuns: 500 },
    );
  });
});
