import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** The package version, found by walking up from this module to navassay's package.json. */
export function packageVersion(): string {
  let directory = dirname(fileURLToPath(import.meta.url));
  for (;;) {
    const candidate = join(directory, 'package.json');
    if (existsSync(candidate)) {
      const manifest = JSON.parse(readFileSync(candidate, 'utf8')) as { name?: string; version?: string };
      if (manifest.name === 'navassay') return manifest.version ?? '0.0.0';
    }
    const parent = dirname(directory);
    if (parent === directory) return '0.0.0';
    directory = parent;
  }
}
