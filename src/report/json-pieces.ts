/**
 * JSON text in pieces: the concatenation of `jsonPieces(value, indent)` is exactly
 * `JSON.stringify(value, null, indent)`, but no piece holds more than one element of a long
 * array. A daily answer at 10,000 series is 60–80 MB of JSON; made whole, the text and the
 * garbage of making it raised the process's peak memory by several hundred megabytes.
 *
 * Objects and arrays are walked here; each element of a long array (and every other leaf or
 * short array) is given to `JSON.stringify` itself, re-indented to its depth. JSON strings never
 * hold a raw line break, so re-indenting every line break of a stringified element is safe.
 */

/** Arrays longer than this are written element by element; shorter ones are stringified whole. */
const LONG_ARRAY = 64;

export function* jsonPieces(value: unknown, indent: number): Generator<string> {
  const root = jsonValueOf(value, '');
  if (root === undefined) return; // JSON.stringify gives undefined: nothing to write
  yield* piecesOf(root, indent, 0);
}

function* piecesOf(value: unknown, indent: number, depth: number): Generator<string> {
  if (Array.isArray(value) && value.length > 0) yield* arrayPieces(value, indent, depth);
  else if (isWalkableObject(value)) yield* objectPieces(value, indent, depth);
  else yield stringifiedAt(value, indent, depth);
}

function* arrayPieces(array: readonly unknown[], indent: number, depth: number): Generator<string> {
  const inner = lineStart(indent, depth + 1);
  const long = array.length > LONG_ARRAY;
  if (!long && !array.some(isWalkableContainer)) {
    yield stringifiedAt(array, indent, depth);
    return;
  }
  yield '[';
  for (let i = 0; i < array.length; i++) {
    yield (i === 0 ? '' : ',') + inner;
    const element = jsonValueOf(array[i], String(i));
    if (element === undefined) yield 'null';
    else if (long) yield stringifiedAt(element, indent, depth + 1);
    else yield* piecesOf(element, indent, depth + 1);
  }
  yield lineStart(indent, depth) + ']';
}

function* objectPieces(object: Record<string, unknown>, indent: number, depth: number): Generator<string> {
  const inner = lineStart(indent, depth + 1);
  const separator = indent > 0 ? ': ' : ':';
  let first = true;
  for (const key of Object.keys(object)) {
    const member = jsonValueOf(object[key], key);
    if (member === undefined) continue;
    yield (first ? '{' : ',') + inner + JSON.stringify(key) + separator;
    first = false;
    yield* piecesOf(member, indent, depth + 1);
  }
  yield first ? '{}' : lineStart(indent, depth) + '}';
}

/** What JSON.stringify would write for a value under `key`: after toJSON, or undefined when it skips it. */
function jsonValueOf(value: unknown, key: string): unknown {
  const own = value !== null && typeof value === 'object' && typeof (value as { toJSON?: unknown }).toJSON === 'function' ? (value as { toJSON(key: string): unknown }).toJSON(key) : value;
  return typeof own === 'function' || typeof own === 'symbol' || own === undefined ? undefined : own;
}

/** A plain object (not a boxed number, string or boolean, which JSON writes as their value). */
function isWalkableObject(value: unknown): value is Record<string, unknown> {
  return value !== null && typeof value === 'object' && !Array.isArray(value) && !(value instanceof Number || value instanceof String || value instanceof Boolean);
}

function isWalkableContainer(value: unknown): boolean {
  return (Array.isArray(value) && value.length > 0) || isWalkableObject(value);
}

function stringifiedAt(value: unknown, indent: number, depth: number): string {
  const text = JSON.stringify(value, null, indent);
  return depth === 0 || indent === 0 || !text.includes('\n') ? text : text.replaceAll('\n', lineStart(indent, depth));
}

function lineStart(indent: number, depth: number): string {
  return indent > 0 ? '\n' + ' '.repeat(indent * depth) : '';
}
