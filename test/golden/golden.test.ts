import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { goldenAnswers, normalise } from './answers.js';

/**
 * Every command answers as it did before the job layer (issue 8). The golden answers were
 * produced by the code before the refactoring and read by eye; they are not expectations of new
 * behaviour. To record them again on purpose: `GOLDEN_CAPTURE=1 npx vitest run test/golden`,
 * then read the diff.
 */
const GOLDEN = join('test', 'golden', 'answers');

describe('golden answers', () => {
  it('every command gives the answers it gave before the refactoring', async () => {
    const answers = await goldenAnswers();
    if (process.env.GOLDEN_CAPTURE) {
      rmSync(GOLDEN, { recursive: true, force: true });
      mkdirSync(GOLDEN, { recursive: true });
      for (const [name, text] of Object.entries(answers)) writeFileSync(join(GOLDEN, name), text);
    }
    expect(existsSync(GOLDEN)).toBe(true);
    expect(Object.keys(answers).sort()).toEqual(readdirSync(GOLDEN).sort());
    for (const [name, text] of Object.entries(answers)) {
      expect(normalise(text), name).toBe(normalise(readFileSync(join(GOLDEN, name), 'utf8')));
    }
  });
});
