/**
 * The only mathjs node types and operators a formula may contain. Anything else — assignments,
 * function definitions, accessors, objects, arrays, indexes, ranges, blocks, strings, units — is
 * refused with its position in the input. Runs on the parsed tree before anything else touches it.
 */
import type { MathNode } from 'mathjs';
import { SlopewiseError } from '../errors';
import { FORBIDDEN_NAMES } from './aliases';

/** Operator functions allowed in a formula. */
export const ALLOWED_OPERATORS = new Set([
  'add', 'subtract', 'multiply', 'divide', 'pow', 'unaryMinus', 'unaryPlus',
  'smaller', 'smallerEq', 'larger', 'largerEq', 'equal', 'unequal', 'and', 'or', 'not',
]);

const OPERATOR_WORDS: Readonly<Record<string, string>> = {
  mod: 'modulo', factorial: 'factorial (!)', ctranspose: 'transpose (\')', transpose: 'transpose', to: 'unit conversion',
  xor: 'xor', bitAnd: 'bitwise and', bitOr: 'bitwise or', bitXor: 'bitwise xor', bitNot: 'bitwise not',
  leftShift: 'shift', rightArithShift: 'shift', rightLogShift: 'shift', dotMultiply: 'element-wise *',
  dotDivide: 'element-wise /', dotPow: 'element-wise ^',
};

/** Finds where a name occurs in the input (first occurrence), for error positions. */
export type Locator = (name: string, call: boolean) => number | undefined;

/** Checks every node; throws SlopewiseError('not-allowed'). Iterative, so depth cannot overflow. */
export function checkWhitelist(root: MathNode, locate: Locator): void {
  const stack: MathNode[] = [root];
  while (stack.length > 0) {
    const node = stack.pop() as MathNode;
    switch (node.type) {
      case 'ConstantNode': {
        const v = (node as unknown as { value: unknown }).value;
        if (typeof v !== 'number') {
          throw new SlopewiseError('not-allowed', typeof v === 'string' ? 'Strings are not allowed in a formula' : v === undefined ? 'Nothing to read: the formula is empty' : `The constant ${String(v)} is not allowed in a formula`, undefined);
        }
        break;
      }
      case 'SymbolNode': {
        const name = (node as unknown as { name: string }).name;
        if (FORBIDDEN_NAMES.has(name.toLowerCase()) || name.startsWith('__') && name !== '__omitted') {
          throw new SlopewiseError('not-allowed', `The name '${name}' is not allowed in a formula`, locate(name, false));
        }
        break;
      }
      case 'ParenthesisNode':
        stack.push((node as unknown as { content: MathNode }).content);
        break;
      case 'OperatorNode': {
        const op = node as unknown as { fn: string; op: string; args: MathNode[] };
        if (!ALLOWED_OPERATORS.has(op.fn)) {
          throw new SlopewiseError('not-allowed', `The operator ${OPERATOR_WORDS[op.fn] ?? op.op} is not supported in a formula`, undefined);
        }
        stack.push(...op.args);
        break;
      }
      case 'ConditionalNode': {
        const c = node as unknown as { condition: MathNode; trueExpr: MathNode; falseExpr: MathNode };
        stack.push(c.condition, c.trueExpr, c.falseExpr);
        break;
      }
      case 'FunctionNode': {
        const f = node as unknown as { fn: MathNode; args: MathNode[] };
        if (f.fn.type !== 'SymbolNode') throw new SlopewiseError('not-allowed', 'Only named functions may be called', undefined);
        const name = (f.fn as unknown as { name: string }).name;
        if (FORBIDDEN_NAMES.has(name.toLowerCase())) {
          throw new SlopewiseError('not-allowed', `Calling '${name}' is not allowed in a formula`, locate(name, true));
        }
        stack.push(...f.args);
        break;
      }
      case 'FunctionAssignmentNode':
        throw new SlopewiseError('not-allowed', 'Function definitions are not allowed in a formula', undefined);
      case 'AssignmentNode':
        throw new SlopewiseError('not-allowed', 'Assignments are not allowed in a formula', undefined);
      case 'AccessorNode':
      case 'IndexNode':
        throw new SlopewiseError('not-allowed', 'Property access and indexing are not allowed in a formula', undefined);
      case 'ObjectNode':
        throw new SlopewiseError('not-allowed', 'Objects are not allowed in a formula', undefined);
      case 'ArrayNode':
        throw new SlopewiseError('not-allowed', 'Arrays are not allowed in a formula', undefined);
      case 'RangeNode':
        throw new SlopewiseError('not-allowed', 'Ranges (a:b) are not allowed in a formula', undefined);
      case 'BlockNode':
        throw new SlopewiseError('not-allowed', 'Only one expression is allowed in a formula', undefined);
      case 'RelationalNode':
        throw new SlopewiseError('not-allowed', 'Chained comparisons (a < x < b) are not supported; write a < x and x < b', undefined);
      default:
        throw new SlopewiseError('not-allowed', `${node.type} is not allowed in a formula`, undefined);
    }
  }
}
