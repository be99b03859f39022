import { readFileSync } from 'node:fs';
import { InputError } from '../ingest/errors.js';
import { parseYaml, validateYaml } from '../config/yaml-errors.js';
import { ToleranceSettingsSchema, type ToleranceSettings } from './tolerances.js';

/** Reads a tolerances file (`run`, `categories`, `series`, as under `reconcile.tolerances` in a run configuration). */
export function loadToleranceFile(path: string): ToleranceSettings {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    throw new InputError(`${path}: cannot open the tolerances file; check the path.`);
  }
  return validateYaml(parseYaml(text, path), ToleranceSettingsSchema) as ToleranceSettings;
}
