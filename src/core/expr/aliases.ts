/**
 * Function names of every dialect → canonical stock-mathjs functions. Lookup is case-insensitive
 * (Go's math.Exp, Fortran's EXP, C's expf / __expf, Rust's ln / exp_m1 / signum).
 */

/** Stock functions of the canonical form, with their arity. */
export const STOCK_FUNCTIONS: Readonly<Record<string, readonly [number, number]>> = {
  exp: [1, 1], log: [1, 2], log1p: [1, 1], expm1: [1, 1], sqrt: [1, 1], cbrt: [1, 1], abs: [1, 1],
  sign: [1, 1], sin: [1, 1], cos: [1, 1], tan: [1, 1], sinh: [1, 1], cosh: [1, 1], tanh: [1, 1],
  sech: [1, 1], asinh: [1, 1], atan: [1, 1], erf: [1, 1], max: [2, 16], min: [2, 16],
};

/** Rewrites handled in normalize.ts (not stock functions themselves). */
export const SPECIAL_FUNCTIONS = new Set([
  'pow', 'where', 'ifelse', 'merge', 'clamp', 'clip', 'clamp_min', 'clamp_max', 'square', 'rsqrt',
  'reciprocal', 'log10', 'log2', 'exp2', 'cube', 'erfc', 'neg', 'plus', 'minus', 'times', 'over', 'fma', 'saturate',
]);

const ALIASES: Readonly<Record<string, string>> = {
  expf: 'exp', __expf: 'exp', expl: 'exp', 'exp.': 'exp',
  logf: 'log', __logf: 'log', logl: 'log', ln: 'log', alog: 'log', dlog: 'log',
  log1pf: 'log1p', ln_1p: 'log1p', ln1p: 'log1p',
  expm1f: 'expm1', exp_m1: 'expm1',
  sqrtf: 'sqrt', __fsqrt_rn: 'sqrt', dsqrt: 'sqrt', cbrtf: 'cbrt',
  fabs: 'abs', fabsf: 'abs', absolute: 'abs', dabs: 'abs', iabs: 'abs',
  signum: 'sign', sgn: 'sign',
  sinf: 'sin', cosf: 'cos', tanf: 'tan', sinhf: 'sinh', coshf: 'cosh', tanhf: 'tanh', __tanhf: 'tanh',
  dtanh: 'tanh', dexp: 'exp', asinhf: 'asinh', arcsinh: 'asinh', atanf: 'atan', arctan: 'atan',
  erff: 'erf',
  fmax: 'max', fmaxf: 'max', maximum: 'max', pmax: 'max', amax1: 'max', dmax1: 'max', fmaxl: 'max', max_: 'max',
  fmin: 'min', fminf: 'min', minimum: 'min', pmin: 'min', amin1: 'min', dmin1: 'min', fminl: 'min', min_: 'min',
  powf: 'pow', powi: 'pow', power: 'pow', float_power: 'pow', __powf: 'pow', powl: 'pow',
  log10f: 'log10', log2f: 'log2', exp2f: 'exp2', erfcf: 'erfc',
  recip: 'reciprocal', clip_by_value: 'clip', clamp_: 'clamp', clip_: 'clip', select: 'where',
  // tensor methods (x.neg(), x.mul(y)…), CUDA intrinsics, Kotlin coerce*, fused multiply-add
  negative: 'neg', add: 'plus', sub: 'minus', subtract: 'minus', mul: 'times', multiply: 'times',
  div: 'over', divide: 'over', true_divide: 'over', __fdividef: 'over', fdividef: 'over', __fdiv_rn: 'over',
  __fmul_rn: 'times', __fadd_rn: 'plus', __fsub_rn: 'minus', __frcp_rn: 'reciprocal', rsqrtf: 'rsqrt',
  __frsqrt_rn: 'rsqrt', __saturatef: 'saturate', fmaf: 'fma', __fmaf_rn: 'fma', mul_add: 'fma',
  coerceatleast: 'clamp_min', coerceatmost: 'clamp_max', coercein: 'clamp',
};

/** Names that must never be called, even though mathjs knows them. */
export const FORBIDDEN_NAMES = new Set([
  'import', 'createunit', 'evaluate', 'parse', 'compile', 'simplify', 'simplifycore', 'derivative', 'config',
  'typed', 'chain', 'help', 'reviver', 'replacer', 'print', 'format', 'function', 'eval', 'require',
  'constructor', '__proto__', 'prototype', 'tostring', 'valueof', 'hasownproperty', 'resolve', 'rationalize',
  'parser', 'create', 'factory', 'apply', 'call', 'bind', 'settimeout', 'fetch', 'process', 'globalthis',
  'window', 'document', 'this', 'new', 'delete', 'exec', 'system',
]);

/** Canonical name for a dialect spelling, or the lower-cased name itself. */
export function resolveAlias(name: string): string {
  const lower = name.toLowerCase();
  return ALIASES[lower] ?? lower;
}

/** Edit distance with adjacent transpositions (optimal string alignment); names are short, O(a·b). */
export function editDistance(a: string, b: string): number {
  if (a.length > 40 || b.length > 40) return 99;
  const d: number[][] = [];
  for (let i = 0; i <= a.length; i++) d.push([i, ...Array.from({ length: b.length }, (_, j) => (i === 0 ? j + 1 : 0))]);
  for (let i = 1; i <= a.length; i++) {
    const row = d[i] as number[];
    const up = d[i - 1] as number[];
    for (let j = 1; j <= b.length; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      let v = Math.min((up[j] as number) + 1, (row[j - 1] as number) + 1, (up[j - 1] as number) + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) v = Math.min(v, ((d[i - 2] as number[])[j - 2] as number) + 1);
      row[j] = v;
    }
  }
  return (d[a.length] as number[])[b.length] as number;
}

/** The closest known name within a small distance, for "did you mean". */
export function suggest(name: string, known: readonly string[]): string | undefined {
  const lower = name.toLowerCase();
  let best: string | undefined;
  let bestD = lower.length <= 3 ? 2 : 3;
  for (const k of known) {
    const d = editDistance(lower, k);
    if (d < bestD) { bestD = d; best = k; }
  }
  return best;
}

export function allKnownFunctionNames(catalogue: readonly string[]): string[] {
  return [...Object.keys(STOCK_FUNCTIONS), ...SPECIAL_FUNCTIONS, ...Object.keys(ALIASES), ...catalogue];
}
