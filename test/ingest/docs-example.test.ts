import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { navTuples, readText } from './helpers.js';

const doc = readFileSync(fileURLToPath(new URL('../../docs/ingestion.md', import.meta.url)), 'utf8');

describe('docs/ingestion.md example profile', () => {
  it('parses and reads the vendor sample it describes', () => {
    const yamlBlock = /```yaml\n([\s\S]*?)```/.exec(doc)![1];
    const sample = /```\n(Fund Code[\s\S]*?)```/.exec(doc)![1];
    const config = parse(yamlBlock) as { profiles: Record<string, Record<string, unknown>>; files: { nav: { profile: string } } };
    const result = readText(sample, 'nav', config.profiles[config.files.nav.profile]);
    expect(result.rows).toEqual({ read: 1, accepted: 1, rejected: 0 });
    expect(navTuples(result)).toEqual([[2, 'NVA0001', '2026-12-31', 1234.56]]);
  });

  it('ISO dates padded with tabs read under date_format iso', () => {
    expect(navTuples(readText('series_id,date,nav\nNVA0001,\t2026-12-31 ,1\n', 'nav', { date_format: 'iso' }))).toEqual([[2, 'NVA0001', '2026-12-31', 1]]);
  });
});
