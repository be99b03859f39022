import { LineCounter, parseDocument, type Document } from 'yaml';
import type { z } from 'zod';
import { ConfigError } from '../ingest/errors.js';

/** A parsed YAML document that can say on which line a key path stands. */
export interface LocatedYaml {
  readonly file: string;
  readonly value: unknown;
  lineOf(path: ReadonlyArray<PropertyKey>): number;
}

export function parseYaml(text: string, file: string): LocatedYaml {
  const lineCounter = new LineCounter();
  const document: Document = parseDocument(text, { lineCounter, prettyErrors: false });
  if (document.errors.length > 0) {
    const error = document.errors[0];
    const line = lineCounter.linePos(error.pos[0]).line;
    throw new ConfigError(`${file}, line ${line}: the YAML cannot be read (${error.message.split('\n')[0]}); fix the syntax.`);
  }
  const lineOf = (path: ReadonlyArray<PropertyKey>): number => {
    for (let depth = path.length; depth >= 0; depth--) {
      const node = document.getIn(path.slice(0, depth) as unknown[], true) as { range?: [number, number, number] } | undefined;
      if (node && typeof node === 'object' && node.range) return lineCounter.linePos(node.range[0]).line;
    }
    return 1;
  };
  return { file, value: document.toJS() ?? {}, lineOf };
}

/** Validates a located YAML value; the first problem becomes one sentence with file, line and key path. */
export function validateYaml<S extends z.ZodType>(yaml: LocatedYaml, schema: S): z.output<S> {
  const result = schema.safeParse(yaml.value);
  if (result.success) return result.data;
  const issue = result.error.issues[0];
  const path = issue.path as PropertyKey[];
  const keyPath = path.length === 0 ? 'the top level' : path.map(String).join('.');
  const line = yaml.lineOf(issue.code === 'unrecognized_keys' ? [...path, issue.keys[0]] : path);
  throw new ConfigError(`${yaml.file}, line ${line}: ${keyPath}: ${describeIssue(issue, schema)}; fix this key and run again.`);
}

function describeIssue(issue: z.core.$ZodIssue, schema: z.ZodType): string {
  if (issue.code === 'unrecognized_keys') {
    const allowed = allowedKeysAt(schema, issue.path as PropertyKey[]);
    const unknown = `unknown key${issue.keys.length > 1 ? 's' : ''} ${issue.keys.map((k) => `"${k}"`).join(', ')}`;
    return allowed ? `${unknown} (allowed: ${allowed.join(', ')})` : unknown;
  }
  if (issue.code === 'invalid_value') return `must be one of ${issue.values.map((v) => JSON.stringify(v)).join(', ')}`;
  return issue.message.replace(/^Invalid input: /, '');
}

/** The keys an object schema allows at a path, looking through optional, default and record layers. */
function allowedKeysAt(schema: z.ZodType, path: readonly PropertyKey[]): string[] | null {
  let node: unknown = schema;
  for (const key of path) {
    node = unwrap(node);
    const def = (node as { _zod?: { def?: Record<string, unknown> } })._zod?.def;
    if (def?.type === 'object') node = (def.shape as Record<string, unknown>)[String(key)];
    else if (def?.type === 'record') node = def.valueType;
    else if (def?.type === 'array') node = def.element;
    else return null;
    if (node === undefined) return null;
  }
  const def = (unwrap(node) as { _zod?: { def?: Record<string, unknown> } })._zod?.def;
  return def?.type === 'object' ? Object.keys(def.shape as Record<string, unknown>) : null;
}

function unwrap(node: unknown): unknown {
  let current = node as { _zod?: { def?: { type?: string; innerType?: unknown } } };
  while (current?._zod?.def && ['optional', 'default', 'nullable', 'prefault'].includes(current._zod.def.type ?? '')) {
    current = current._zod.def.innerType as typeof current;
  }
  return current;
}
