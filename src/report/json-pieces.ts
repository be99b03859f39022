/**
 * JSON text in pieces: the concatenation of `jsonPieces(value, indent)` is exactly
 * `JSON.stringify(value, null, indent)`, but no piece holds more than 128 elements of a long
 * array. A daily answer at 10,000 series is 60–80 MB of JSON; made whole, the text and the
 * garbage of making it raised the process's peak memory by several hundred megabytes.
 *
 * Objects and short arrays holding containers are walked here; a long array is stringified 128
 * elements at a time, and everything else is given to `JSON.stringify` itself, indented to its
 * depth: the value is stringified inside as many one-element arrays as its depth, so the engine
 * indents it, and the wrapping is cut off (a substring, not a copy).
 */

/** Arrays longer than this are written a slice at a time; shorter ones are walked, or stringified whole when they hold no container. */
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
  if (long) {
    for (let start = 0; start < array.length; start += ELEMENTS_PER_PIECE) {
      // The comma apart: joined to the piece it would make a new string to copy before encoding.
      if (start > 0) yield ',';
      yield elementsAt(array, start, Math.min(start + ELEMENTS_PER_PIECE, array.length), indent, depth);
    }
  } else {
    for (let i = 0; i < array.length; i++) {
      yield (i === 0 ? '' : ',') + inner;
      const element = jsonValueOf(array[i], String(i));
      if (element === undefined) yield 'null';
      else yield* piecesOf(element, indent, depth + 1);
    }
  }
  yield lineStart(indent, depth) + ']';
}

/** Elements of a long array stringified together: one call of JSON.stringify per piece, not per element. */
const ELEMENTS_PER_PIECE = 128;

/**
 * Elements `start` to `end` of a long array as they appear inside it at `depth`: each on its own
 * line, separated by commas, without the brackets. JSON.stringify of the slice gives exactly that
 * between its brackets, except that a toJSON method would be told the slice's index instead of
 * the array's, so a slice holding such an element is written element by element.
 */
function elementsAt(array: readonly unknown[], start: number, end: number, indent: number, depth: number): string {
  const slice = array.slice(start, end);
  if (slice.some(hasToJson)) {
    return slice.map((element, k) => lineStart(indent, depth + 1) + stringifiedAt(jsonValueOf(element, String(start + k)) ?? null, indent, depth + 1)).join(',');
  }
  // The slice as it stands at `depth`, "[\n    a,\n    b\n  ]", without its brackets and the line break before the last one.
  const text = stringifiedAt(slice, indent, depth);
  return text.slice(1, text.length - 1 - lineStart(indent, depth).length);
}

function hasToJson(value: unknown): value is { toJSON(key: string): unknown } {
  return value !== null && typeof value === 'object' && typeof (value as { toJSON?: unknown }).toJSON === 'function';
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
  const own = hasToJson(value) ? value.toJSON(key) : value;
  return typeof own === 'function' || typeof own === 'symbol' || own === undefined ? undefined : own;
}

/** A plain object (not a boxed number, string or boolean, which JSON writes as their value). */
function isWalkableObject(value: unknown): value is Record<string, unknown> {
  return value !== null && typeof value === 'object' && !Array.isArray(value) && !(value instanceof Number || value instanceof String || value instanceof Boolean);
}

function isWalkableContainer(value: unknown): boolean {
  return (Array.isArray(value) && value.length > 0) || isWalkableObject(value);
}

/** JSON text of a value (toJSON already applied) as it stands at `depth`: every line after the first indented to it. */
function stringifiedAt(value: unknown, indent: number, depth: number): string {
  if (depth === 0 || indent === 0 || value === null || typeof value !== 'object') return JSON.stringify(value, null, indent);
  // A value with a toJSON of its own would be told the wrapper's key ("0") instead of "".
  if (hasToJson(value)) return JSON.stringify(value, null, indent).replaceAll('\n', lineStart(indent, depth));
  let wrapped: unknown = value;
  for (let level = 0; level < depth; level++) wrapped = [wrapped];
  const text = JSON.stringify(wrapped, null, indent);
  return text.slice(wrapperOpening(indent, depth).length, text.length - wrapperClosing(indent, depth).length);
}

/** What `depth` one-element arrays write before their element: "[\n  [\n    " at depth 2, indentation 2. */
function wrapperOpening(indent: number, depth: number): string {
  let text = '';
  for (let level = 1; level <= depth; level++) text += '[' + lineStart(indent, level);
  return text;
}

/** What they write after it: "\n  ]\n]" at depth 2, indentation 2. */
function wrapperClosing(indent: number, depth: number): string {
  let text = '';
  for (let level = depth - 1; level >= 0; level--) text += lineStart(indent, level) + ']';
  return text;
}

function lineStart(indent: number, depth: number): string {
  return indent > 0 ? '\n' + ' '.repeat(indent * depth) : '';
}
