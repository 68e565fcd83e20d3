/**
 * Every user-visible message of the checker, in one place, so tests can assert exact strings.
 */
export const MESSAGES = {
  derivativeMismatch: (origin: 'code' | 'comment', name: string, forward: string, argument: 'input' | 'output', x: string, expected: string, found: string): string =>
    `${origin === 'comment' ? 'The derivative in this comment' : `${name}`} disagrees with the derivative of ${forward}` +
    `${argument === 'output' ? ' (read as a function of the saved output)' : ''}: at x = ${x} it gives ${found}, expected ${expected}`,
  givenInputComputesOutput: (name: string, forward: string): string =>
    `${name} is given the input of ${forward}, but its formula is the derivative written in terms of the output`,
  givenOutputComputesInput: (name: string, forward: string): string =>
    `${name} is given the saved output of ${forward}, but its formula is the derivative written in terms of the input`,
  callSiteInput: (name: string, arg: string, forward: string): string =>
    `${name} expects the output of ${forward}, but here it is called with the input ${arg}: pass ${forward}(${arg})`,
  formulaMismatch: (name: string, x: string, code: string, comment: string): string =>
    `This formula disagrees with the code of ${name} below it: at x = ${x} the code gives ${code}, the comment ${comment}`,
  forwardHere: (name: string): string => `forward ${name}`,
  codeHere: (name: string): string => `code of ${name}`,
  derivativeHere: (name: string): string => `${name} takes the saved output`,
  fixTitle: (): string => 'Replace with the derivative of the forward',
  stableFixTitle: (title: string): string => `Rewrite in a stable form (${title})`,
  breakdownAt: (type: string, kind: string, from: number | null, to: number | null): string =>
    `${kind} in ${type} for x in [${from === null ? '−∞' : Number(from.toPrecision(4))}, ${to === null ? '∞' : Number(to.toPrecision(4))}]`,
  unstable: (name: string, title: string, where: string, types: string): string =>
    `${name} breaks down in low precision (${where}; affects ${types}); a stable rewrite exists: ${title}`,
  vanishing: (name: string, activation: string, loss: string, detail?: string): string =>
    `${name} feeds ${activation} into ${loss}: the gradient vanishes where the loss is largest${detail ? ` (${detail})` : ''}`,
} as const;
