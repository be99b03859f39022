import { isAlias, isCollection, isPair, isScalar, LineCounter, parseDocument, type Document } from 'yaml';
import type { z } from 'zod';
import { ConfigError, cutInput } from '../ingest/errors.js';
import { LIMIT_DEFAULTS } from '../ingest/limits.js';

/** A parsed YAML document that can say on which line a key path stands. */
export interface LocatedYaml {
  readonly file: string;
  readonly value: unknown;
  lineOf(path: ReadonlyArray<PropertyKey>): number;
}

/**
 * Parses YAML from a file nobody vetted. Two limits, which the document's own `limits:` section
 * may raise, keep it bounded: the nesting depth of its collections (a thousand nested brackets
 * would overflow the stack) and the alias expansions (`*name`; nine aliases to nine aliases,
 * ten levels deep, would expand to billions of nodes).
 */
export function parseYaml(text: string, file: string): LocatedYaml {
  const lineCounter = new LineCounter();
  const document: Document = guarded(file, () => parseDocument(text, { lineCounter, prettyErrors: false }));
  if (document.errors.length > 0) {
    const error = document.errors[0];
    const line = lineCounter.linePos(error.pos[0]).line;
    throw new ConfigError(`${file}, line ${line}: the YAML cannot be read (${cutInput(error.message)}); fix the syntax.`);
  }
  const lineOf = (path: ReadonlyArray<PropertyKey>): number => {
    for (let depth = path.length; depth >= 0; depth--) {
      const node = document.getIn(path.slice(0, depth) as unknown[], true) as { range?: [number, number, number] } | undefined;
      if (node && typeof node === 'object' && node.range) return lineCounter.linePos(node.range[0]).line;
    }
    return 1;
  };
  const maxDepth = documentLimit(document, 'yaml_max_depth', LIMIT_DEFAULTS.yaml_max_depth);
  const tooDeep = deepestNode(document.contents, maxDepth);
  if (tooDeep) {
    const line = tooDeep.range ? lineCounter.linePos(tooDeep.range[0]).line : 1;
    throw new ConfigError(`${file}, line ${line}: the YAML nests deeper than ${maxDepth} levels; flatten it, or raise limits.yaml_max_depth if it is genuine.`);
  }
  const maxAliasCount = documentLimit(document, 'yaml_max_aliases', LIMIT_DEFAULTS.yaml_max_aliases);
  const value = guarded(file, () => {
    try {
      return document.toJS({ maxAliasCount });
    } catch (error) {
      if (error instanceof ReferenceError && /alias/i.test(error.message)) {
        throw new ConfigError(`${file}: the YAML expands its aliases (*name) more than ${maxAliasCount} times; write the values out, or raise limits.yaml_max_aliases if it is genuine.`);
      }
      throw error;
    }
  });
  return { file, value: value ?? {}, lineOf };
}

/** Runs a step of the YAML library; a stack overflow on a malformed nesting becomes a ConfigError. */
function guarded<T>(file: string, step: () => T): T {
  try {
    return step();
  } catch (error) {
    if (error instanceof ConfigError) throw error;
    if (error instanceof RangeError) {
      throw new ConfigError(`${file}: the YAML nests too deeply to be read; flatten it.`);
    }
    throw new ConfigError(`${file}: the YAML cannot be read (${cutInput(String((error as Error)?.message ?? error))}); fix the syntax.`);
  }
}

/** A limit the document sets for itself under `limits:`, when it is a plain whole number. */
function documentLimit(document: Document, key: string, fallback: number): number {
  let node: unknown;
  try {
    node = document.getIn(['limits', key], true);
  } catch {
    return fallback; // `limits` is not a mapping; validation reports it
  }
  const value = isScalar(node) ? node.value : undefined;
  return typeof value === 'number' && Number.isInteger(value) && value >= 0 ? value : fallback;
}

type RangedNode = { range?: [number, number, number] | null };

/** The first collection nested deeper than `maxDepth`, found without recursion, or null. */
function deepestNode(root: unknown, maxDepth: number): RangedNode | null {
  const stack: Array<{ node: unknown; depth: number }> = [{ node: root, depth: 0 }];
  while (stack.length > 0) {
    const { node, depth } = stack.pop()!;
    if (isPair(node)) {
      stack.push({ node: node.key, depth }, { node: node.value, depth });
    } else if (isCollection(node)) {
      if (depth + 1 > maxDepth) return node as RangedNode;
      for (const item of node.items) stack.push({ node: item, depth: depth + 1 });
    } else if (isAlias(node) || isScalar(node)) {
      continue;
    }
  }
  return null;
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
