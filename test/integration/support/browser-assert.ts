// The subset of `node:assert` (strict semantics) that in-host tests use, for the browser extension
// host where Node's module does not exist. scripts/build.mjs maps `assert`, `node:assert`,
// `assert/strict` and `node:assert/strict` to this file in the web test bundle only; the Node host uses
// the real module. Comparison follows Node's strict mode: Object.is for primitives, structural
// equality (same prototype, own enumerable keys) for objects.

export class AssertionError extends Error {
  override name = 'AssertionError';
  constructor(message: string, readonly actual?: unknown, readonly expected?: unknown, readonly operator?: string) {
    super(message);
  }
}

function show(v: unknown): string {
  try {
    if (typeof v === 'string') return JSON.stringify(v);
    if (typeof v === 'bigint') return `${v}n`;
    if (typeof v === 'function') return `[Function ${v.name || 'anonymous'}]`;
    const s = JSON.stringify(v, (_k, x: unknown) => (typeof x === 'bigint' ? `${x}n` : x));
    return s === undefined ? String(v) : s;
  } catch {
    return String(v);
  }
}

function failWith(message: string | Error | undefined, fallback: string, actual?: unknown, expected?: unknown, op?: string): never {
  if (message instanceof Error) throw message;
  throw new AssertionError(message ?? fallback, actual, expected, op);
}

function deepEq(a: unknown, b: unknown, seen: Map<object, object>): boolean {
  if (Object.is(a, b)) return true;
  if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null) return false;
  if (Object.getPrototypeOf(a) !== Object.getPrototypeOf(b)) return false;
  if (seen.get(a) === b) return true;
  seen.set(a, b);
  if (a instanceof Date && b instanceof Date) return Object.is(a.getTime(), b.getTime());
  if (a instanceof RegExp && b instanceof RegExp) return a.source === b.source && a.flags === b.flags;
  if (a instanceof Map && b instanceof Map) {
    if (a.size !== b.size) return false;
    for (const [k, v] of a) if (!b.has(k) || !deepEq(v, b.get(k), seen)) return false;
    return true;
  }
  if (a instanceof Set && b instanceof Set) {
    if (a.size !== b.size) return false;
    for (const v of a) if (!b.has(v)) return false;
    return true;
  }
  if (ArrayBuffer.isView(a) && ArrayBuffer.isView(b)) {
    const x = a as unknown as ArrayLike<unknown>;
    const y = b as unknown as ArrayLike<unknown>;
    if (x.length !== y.length) return false;
    for (let i = 0; i < x.length; i++) if (!Object.is(x[i], y[i])) return false;
    return true;
  }
  const ka = Object.keys(a);
  const kb = Object.keys(b);
  if (ka.length !== kb.length) return false;
  for (const k of ka) {
    if (!Object.prototype.hasOwnProperty.call(b, k)) return false;
    if (!deepEq((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], seen)) return false;
  }
  return true;
}

export function ok(value: unknown, message?: string | Error): asserts value {
  if (!value) failWith(message, `expected a truthy value, got ${show(value)}`, value, true, '==');
}

export function equal<T>(actual: unknown, expected: T, message?: string | Error): asserts actual is T {
  if (!Object.is(actual, expected)) failWith(message, `expected ${show(actual)} to equal ${show(expected)}`, actual, expected, 'strictEqual');
}
export const strictEqual = equal;

export function notEqual(actual: unknown, expected: unknown, message?: string | Error): void {
  if (Object.is(actual, expected)) failWith(message, `expected ${show(actual)} not to equal ${show(expected)}`, actual, expected, 'notStrictEqual');
}
export const notStrictEqual = notEqual;

export function deepEqual<T>(actual: unknown, expected: T, message?: string | Error): asserts actual is T {
  if (!deepEq(actual, expected, new Map())) {
    failWith(message, `expected ${show(actual)} to deep-equal ${show(expected)}`, actual, expected, 'deepStrictEqual');
  }
}
export const deepStrictEqual = deepEqual;

export function notDeepEqual(actual: unknown, expected: unknown, message?: string | Error): void {
  if (deepEq(actual, expected, new Map())) failWith(message, `expected ${show(actual)} not to deep-equal ${show(expected)}`, actual, expected, 'notDeepStrictEqual');
}
export const notDeepStrictEqual = notDeepEqual;

export function match(value: string, re: RegExp, message?: string | Error): void {
  if (typeof value !== 'string' || !re.test(value)) failWith(message, `expected ${show(value)} to match ${re}`, value, re, 'match');
}

export function doesNotMatch(value: string, re: RegExp, message?: string | Error): void {
  if (typeof value !== 'string' || re.test(value)) failWith(message, `expected ${show(value)} not to match ${re}`, value, re, 'doesNotMatch');
}

export function fail(message?: string | Error): never {
  return failWith(message, 'Failed');
}

type ErrorCheck = RegExp | ((err: unknown) => boolean) | (new (...args: never[]) => unknown) | Record<string, unknown>;

function checkError(err: unknown, expected: ErrorCheck | undefined, message?: string | Error): void {
  if (expected === undefined) return;
  if (expected instanceof RegExp) {
    const text = err instanceof Error ? `${err.name}: ${err.message}` : String(err);
    if (!expected.test(text) && !(err instanceof Error && expected.test(err.message))) {
      failWith(message, `error ${show(text)} does not match ${expected}`, err, expected, 'throws');
    }
    return;
  }
  if (typeof expected === 'function') {
    if (expected.prototype !== undefined && err instanceof (expected as new () => unknown)) return;
    if (Error.isPrototypeOf(expected) || expected === Error) {
      failWith(message, `expected error of type ${(expected as { name: string }).name}`, err, expected, 'throws');
    }
    if ((expected as (e: unknown) => boolean)(err) !== true) failWith(message, 'error validation function returned false', err, expected, 'throws');
    return;
  }
  for (const [k, v] of Object.entries(expected)) {
    const got = (err as Record<string, unknown>)[k];
    const same = v instanceof RegExp && typeof got === 'string' ? v.test(got) : deepEq(got, v, new Map());
    if (!same) failWith(message, `error.${k} is ${show(got)}, expected ${show(v)}`, err, expected, 'throws');
  }
}

export function throws(fn: () => unknown, expected?: ErrorCheck | string, message?: string | Error): void {
  if (typeof expected === 'string') { message = expected; expected = undefined; }
  try {
    fn();
  } catch (err) {
    checkError(err, expected, message);
    return;
  }
  failWith(message, 'Missing expected exception.', undefined, expected, 'throws');
}

export function doesNotThrow(fn: () => unknown, message?: string | Error): void {
  try { fn(); } catch (err) { failWith(message, `Got unwanted exception: ${err instanceof Error ? err.message : show(err)}`, err, undefined, 'doesNotThrow'); }
}

export async function rejects(p: Promise<unknown> | (() => Promise<unknown>), expected?: ErrorCheck | string, message?: string | Error): Promise<void> {
  if (typeof expected === 'string') { message = expected; expected = undefined; }
  try {
    await (typeof p === 'function' ? p() : p);
  } catch (err) {
    checkError(err, expected, message);
    return;
  }
  failWith(message, 'Missing expected rejection.', undefined, expected, 'rejects');
}

export async function doesNotReject(p: Promise<unknown> | (() => Promise<unknown>), message?: string | Error): Promise<void> {
  try { await (typeof p === 'function' ? p() : p); } catch (err) {
    failWith(message, `Got unwanted rejection: ${err instanceof Error ? err.message : show(err)}`, err, undefined, 'doesNotReject');
  }
}

/** `assert(value)` as a function, with every assertion as a property (like Node's default export). */
const assert = Object.assign(
  (value: unknown, message?: string | Error): void => ok(value, message),
  {
    ok, equal, strictEqual, notEqual, notStrictEqual, deepEqual, deepStrictEqual, notDeepEqual,
    notDeepStrictEqual, match, doesNotMatch, fail, throws, doesNotThrow, rejects, doesNotReject, AssertionError,
  },
);
(assert as unknown as { strict: unknown }).strict = assert;
export const strict = assert;
export default assert;
