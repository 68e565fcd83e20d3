/**
 * C, C++, CUDA, Java, Kotlin, JavaScript/TypeScript, Go: casts `(float)x`, `static_cast<float>(x)`,
 * `(double) x`, operators `&&` `||` `!` `===`, `**` (JS), and the C `^` warning (bitwise XOR there).
 * Function names (expf, __expf, tanhf, fmaxf, Math.exp, math.Exp …) are resolved later in
 * `aliases.ts`; namespace prefixes (std::, Math., kotlin.math.) in `modules.ts`.
 */
import { SlopewiseError } from '../../errors';
import type { Item } from './tree';
import type { Token } from './lexer';
import { isGroup, isId, isOp, isParenGroup } from './tree';

const C_TYPES = new Set([
  'float', 'double', 'half', '__half', 'int', 'long', 'float32_t', 'float64_t', 'float16_t', 'bfloat16', '__nv_bfloat16',
  'scalar_t', 'real', 'Float', 'Double', 'T', 'f32', 'f64', 'acc_t', 'accscalar_t', 'opmath_t', 'float32', 'float64', 'float16',
]);

/** (float)x, (double)(…), static_cast<float>(…), float(x) in C++ functional casts, Float64(x) in Julia. */
export function dropCasts(items: Item[]): Item[] {
  const out: Item[] = [];
  for (let i = 0; i < items.length; i++) {
    const it = items[i] as Item;
    if (isParenGroup(it) && it.items.length === 1 && isId(it.items[0]) && C_TYPES.has((it.items[0] as Token).text)) {
      const next = items[i + 1];
      if (next !== undefined && (isGroup(next) || !isOp(next) || isOp(next, '-'))) continue;
    }
    if ((isId(it, 'static_cast') || isId(it, 'reinterpret_cast')) && isOp(items[i + 1], '<') && isOp(items[i + 3], '>')) {
      i += 3;
      continue;
    }
    if (isId(it) && (C_TYPES.has(it.text) || it.text === 'Float32' || it.text === 'Float64' || it.text === 'Float16') && isParenGroup(items[i + 1]) && !isOp(out[out.length - 1], '.')) {
      // float(x) → (x)
      continue;
    }
    out.push(it);
  }
  return out;
}

/** Operator spellings of every dialect → mathjs: ** .^ → ^, .* → *, ./ → /, && → and, || → or, ! ~ → not, ~= === → != ==. */
export function normaliseOperators(items: Item[], notes: Set<string>, xorLanguage: boolean): Item[] {
  return items.map((it, i) => {
    if (isGroup(it) || it.kind !== 'op') return it;
    switch (it.text) {
      case '**': case '.^': return { ...it, text: '^' };
      case '.*': return { ...it, text: '*' };
      case '.+': return { ...it, text: '+' };
      case '.-': return { ...it, text: '-' };
      case './': return { ...it, text: '/' };
      case '&&': case '&': return { ...it, text: 'and' };
      case '||': return { ...it, text: 'or' };
      case '===': return { ...it, text: '==' };
      case '!==': case '~=': return { ...it, text: '!=' };
      case '!': case '~': {
        const prev = items[i - 1];
        const prefix = prev === undefined || (!isGroup(prev) && prev.kind === 'op');
        if (!prefix) throw new SlopewiseError('not-allowed', `Postfix ${it.text} (factorial or transpose) is not supported`, it.start);
        return { ...it, text: 'not' };
      }
      case '^':
        if (xorLanguage) notes.add('^ is bitwise XOR in this language; read as a power as in maths notation');
        return it;
      default:
        return it;
    }
  });
}
