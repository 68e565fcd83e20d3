/**
 * Library prefixes of every dialect: math., np./numpy., torch., F., torch.nn.functional., jnp.,
 * jax.nn., jax.numpy., tf., tf.math., tf.nn., keras.activations., scipy.special., std::, f32::,
 * Math., kotlin.math., Go's math., Lua's math., Julia's Base. — all dropped in front of a call, so
 * `torch.sigmoid(x)` and `np.exp(x)` read as `sigmoid(x)` and `exp(x)`. Library constants
 * (math.pi, Math.PI, f32::consts::PI, M_PI, np.inf) become pi / e / Infinity.
 */
import type { Item } from './tree';
import type { Token } from './lexer';
import { isId, isOp, isParenGroup } from './tree';

/** Namespace segments that may appear before a function name. */
export const MODULE_SEGMENTS = new Set([
  'math', 'np', 'numpy', 'torch', 'nn', 'functional', 'F', 'special', 'scipy', 'jnp', 'jax', 'tf', 'keras',
  'activations', 'ops', 'std', 'Math', 'kotlin', 'Base', 'f32', 'f64', 'libm', 'cmath', 'mx', 'core',
  'cp', 'cupy', 'Float', 'Double', 'StrictMath', 'java', 'lang', 'nnf', 'lax', 'random', 'backend', 'K',
  'mlx', 'numba', 'paddle', 'flax', 'linen', 'optax', 'sp', 'tnp', 'experimental', 'numpy_ops',
  'SpecialFunctions', 'NNlib', 'Flux', 'Lux', 'stats', 'scipy_special', 'consts', 'cuda', 'thrust',
]);

const CONSTANTS: Readonly<Record<string, string>> = {
  pi: 'pi', PI: 'pi', Pi: 'pi', M_PI: 'pi', e: 'e', E: 'e', M_E: 'e', inf: 'Infinity', INFINITY: 'Infinity',
  Inf: 'Infinity', HUGE_VAL: 'Infinity', POSITIVE_INFINITY: 'Infinity', tau: 'tau', TAU: 'tau',
  M_SQRT2: 'sqrt(2)', SQRT2: 'sqrt(2)', M_SQRT1_2: 'sqrt(0.5)', SQRT1_2: 'sqrt(0.5)', M_LN2: 'log(2)', LN2: 'log(2)',
  M_2_SQRTPI: '(2/sqrt(pi))', FRAC_2_SQRT_PI: '(2/sqrt(pi))', M_1_PI: '(1/pi)',
};

/** Constants that need no prefix (C macros, Rust consts used bare). */
const BARE_CONSTANTS = new Set(['M_PI', 'M_E', 'INFINITY', 'HUGE_VAL', 'M_SQRT2', 'M_SQRT1_2', 'M_LN2', 'M_2_SQRTPI', 'M_1_PI']);

function constantTokens(value: string, at: Token): Token[] {
  // Values are fixed strings of our own (no user text); keep them as one id or a small expression.
  if (value === 'pi' || value === 'e' || value === 'Infinity' || value === 'tau') return [{ ...at, kind: 'id', text: value }];
  return [{ ...at, kind: 'id', text: `(${value})` }];
}

/**
 * Drops namespace chains in front of calls and turns library constants into canonical names.
 * A chain is `seg (.|::) seg … name` where every seg but the last is a known namespace segment.
 */
export function stripModules(items: Item[], notes: Set<string>): Item[] {
  const out: Item[] = [];
  let i = 0;
  while (i < items.length) {
    const it = items[i];
    if (isId(it) && BARE_CONSTANTS.has(it.text) && !isOp(items[i + 1], '.')) {
      out.push(...constantTokens(CONSTANTS[it.text] ?? it.text, it));
      i++;
      continue;
    }
    if (isId(it) && MODULE_SEGMENTS.has(it.text) && (isOp(items[i + 1], '.') || isOp(items[i + 1], '::')) && !isOp(out[out.length - 1], '.')) {
      // Walk the chain.
      let j = i;
      const segs: Token[] = [it];
      while ((isOp(items[j + 1], '.') || isOp(items[j + 1], '::')) && isId(items[j + 2])) {
        segs.push(items[j + 2] as Token);
        j += 2;
      }
      const last = segs[segs.length - 1] as Token;
      const prefixOk = segs.slice(0, -1).every((s) => MODULE_SEGMENTS.has(s.text));
      if (segs.length >= 2 && prefixOk) {
        const prefix = segs.slice(0, -1).map((s) => s.text).join('.');
        if (isParenGroup(items[j + 1]) || isOp(items[j + 1], '.')) {
          // keep the call; remember the library for behaviour that differs (jax gelu default)
          notes.add(`prefix:${prefix}.${last.text}`);
          out.push(last);
          i = j + 1;
          continue;
        }
        const c = CONSTANTS[last.text];
        if (c !== undefined) {
          out.push(...constantTokens(c, { ...last, start: it.start }));
          i = j + 1;
          continue;
        }
      }
    }
    out.push(it as Item);
    i++;
  }
  return out;
}
