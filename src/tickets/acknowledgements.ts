import { readFileSync } from 'node:fs';
import { z } from 'zod';
import { parseIsoDate } from '../calendar/days.js';
import { parseYaml, validateYaml } from '../config/yaml-errors.js';
import { ConfigError } from '../ingest/errors.js';

/**
 * The acknowledgement file a team edits: a YAML list, one entry per ticket it knows about.
 *
 *   - key: "benchmark_mismatch|NVA0004"
 *     reason: mapping fix requested from the product team
 *     who: data-ops
 *     expires: 2026-12-31
 *
 * An entry silences its ticket through its expiry date (inclusive). See docs/tickets.md.
 */
const isoDate = z
  .union([z.string(), z.date()])
  .transform((value) => (value instanceof Date ? value.toISOString().slice(0, 10) : value))
  .refine((text) => parseIsoDate(text) !== null, 'must be a date written YYYY-MM-DD');

const AcknowledgementSchema = z
  .object({
    key: z.string().min(1),
    reason: z.string().min(1, 'must say why the ticket is known'),
    who: z.string().min(1, 'must name who acknowledged it'),
    expires: isoDate,
  })
  .strict();

const FileSchema = z.array(AcknowledgementSchema).nullable().transform((list) => list ?? []);

export type Acknowledgement = z.output<typeof AcknowledgementSchema>;

/** Acknowledgements by ticket key; a missing file is an empty list, a wrong one a clear error. */
export function readAcknowledgements(path: string | undefined): Map<string, Acknowledgement> {
  if (path === undefined) return new Map();
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    return new Map();
  }
  return acknowledgementsFromYaml(text, path);
}

export function acknowledgementsFromYaml(text: string, file: string): Map<string, Acknowledgement> {
  const yaml = parseYaml(text, file);
  const list = validateYaml(yaml, FileSchema);
  const byKey = new Map<string, Acknowledgement>();
  list.forEach((entry, index) => {
    if (byKey.has(entry.key)) throw new ConfigError(`${file}, line ${yaml.lineOf([index, 'key'])}: the key "${entry.key}" is acknowledged twice; keep one entry.`);
    byKey.set(entry.key, entry);
  });
  return byKey;
}

/** A short identity of an acknowledgement's own words: editing it (reason, who, expiry) is re-acknowledging. */
export function acknowledgementIdentity(ack: Acknowledgement): string {
  return JSON.stringify([ack.reason, ack.who, ack.expires]);
}
