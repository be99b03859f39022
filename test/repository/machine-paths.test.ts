import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';

/**
 * A clone must stand on its own: no committed file outside test/ and .ci/ names a path of one
 * particular machine (the project rules; test/ and .ci/ may name scratch locations).
 */
const MACHINE_PATH = /(?<![\w.~-])(?:\/(?:work|home|root|Users|mnt|opt|srv|tmp|var\/folders)\/[\w.-]|[A-Z]:\\\\[\w.])/;

describe('the repository', () => {
  it('names no machine-specific absolute path outside test/ and .ci/', () => {
    const files = execFileSync('git', ['ls-files'], { encoding: 'utf8' })
      .split('\n')
      .filter((file) => file && !file.startsWith('test/') && !file.startsWith('.ci/') && file !== 'package-lock.json');
    const offenders = files.flatMap((file) =>
      readFileSync(file, 'utf8')
        .split('\n')
        .map((line, k) => ({ file, line: k + 1, text: line }))
        .filter(({ text }) => MACHINE_PATH.test(text)),
    );
    expect(offenders).toEqual([]);
  });

  it('the pattern catches what it is for', () => {
    for (const path of ['see /work/shared/docs/interface.md', '`/home/ana/feed.csv`', 'C:\\\\Users\\\\x']) expect(MACHINE_PATH.test(path)).toBe(true);
    for (const path of ['docs/interface.md', 'src/work/x.ts', 'https://example.org/home/x']) expect(MACHINE_PATH.test(path)).toBe(false);
  });
});
