// Shared helpers for the engine tests: evaluation with the *full* mathjs package (the check that
// canonical output is stock mathjs), central finite differences, and tolerances.
import * as assert from 'node:assert/strict';
import { compile } from 'mathjs';

/** Evaluates stock-mathjs text with only the given scope, as any mathjs user would. */
export function stockFn(expr: string, variable: string, params: Record<string, number> = {}): (x: number) => number {
  const code = compile(expr);
  return (x: number) => {
    const v: unknown = code.evaluate({ ...params, [variable]: x });
    if (typeof v === 'boolean') return v ? 1 : 0;
    if (typeof v !== 'number') throw new Error(`${expr} at ${variable}=${x} gave ${String(v)}`);
    return v;
  };
}

/** Central difference f′(x) ≈ (f(x+h) − f(x−h))/2h, error O(h²f‴). */
export function centralDiff(f: (x: number) => number, x: number, h = 1e-5): number {
  return (f(x + h) - f(x - h)) / (2 * h);
}

/** Relative-or-absolute closeness. */
export function assertClose(actual: number, expected: number, tol: number, what: string): void {
  const scale = Math.max(1, Math.abs(expected));
  assert.ok(Number.isFinite(actual), `${what}: got ${actual}, expected ${expected}`);
  assert.ok(Math.abs(actual - expected) <= tol * scale, `${what}: got ${actual}, expected ${expected} (tolerance ${tol})`);
}

/** Points away from every kink the catalogue has (0, ±1, ±2.5, ±3, 6). */
export const POINTS = [-7.3, -4.1, -2.7, -1.6, -0.55, 0.35, 0.8, 1.45, 2.2, 2.8, 4.3, 7.9];

/** Tolerance of a central difference with h = 1e-5 on functions of moderate curvature. */
export const FD_TOL = 2e-6;
